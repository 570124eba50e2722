// Cuts the aligned frames of a recording into fixed-length chunks per channel, the unit in which
// samples are stored. Frame slot s (time = startTime + s / rate) of channel c lands in chunk
// floor(s / chunkSize) at offset s mod chunkSize; slots with no row (gaps in the file) stay NaN.
// A chunk whose samples are all missing is not stored (readers fill NaN for absent chunks).
// Only one chunk per channel is in memory at a time, plus the finished ones not yet written.
import { QualityAccumulator, type ChannelQuality } from './quality';

/** 3600 samples: two minutes at 30 frames/s, one at 60; 28.8 kB per chunk as float64. */
export const DEFAULT_CHUNK_SIZE = 3600;

export interface SampleChunk {
  /** Index into the ingest's mapped channels. */
  channel: number;
  /** Chunk number k: the chunk covers slots [k·chunkSize, (k+1)·chunkSize). */
  seq: number;
  /** Slot of the chunk's first sample (k · chunkSize). */
  startSlot: number;
  /** Epoch seconds of the chunk's first sample. */
  startTime: number;
  /** The samples (the last chunk of a recording may be shorter than chunkSize). */
  values: Float64Array;
}

export class ChunkWriter {
  private startTime = 0;
  private rate = 0;
  private seq = 0;
  private current: Float64Array[] = [];
  private used = 0; // slots of the current chunk reached so far (last slot + 1 − startSlot)
  private lastSlot = -1;
  private quality: QualityAccumulator[] = [];
  private ready: SampleChunk[] = [];
  readyBytes = 0;

  constructor(
    private readonly channels: number,
    readonly chunkSize = DEFAULT_CHUNK_SIZE,
  ) {}

  begin(startTime: number, rate: number): void {
    this.startTime = startTime;
    this.rate = rate;
    this.quality = Array.from({ length: this.channels }, () => new QualityAccumulator(rate));
    this.current = Array.from({ length: this.channels }, () => new Float64Array(this.chunkSize).fill(NaN));
  }

  /** One frame at `slot` (> the previous slot); `values` holds one value per mapped channel. */
  frame(slot: number, values: Float64Array): void {
    const missing = slot - this.lastSlot - 1;
    if (missing > 0) for (const q of this.quality) q.addMissing(missing);
    const seq = Math.floor(slot / this.chunkSize);
    while (seq > this.seq) {
      this.used = this.chunkSize;
      this.finishChunk();
      this.seq++;
    }
    const at = slot - seq * this.chunkSize;
    for (let c = 0; c < this.channels; c++) {
      const v = values[c];
      this.current[c][at] = v;
      this.quality[c].add(v);
    }
    this.used = at + 1;
    this.lastSlot = slot;
  }

  /** Ends the recording: the last, possibly partial, chunk becomes ready. */
  end(): void {
    if (this.used > 0) this.finishChunk();
    this.used = 0;
  }

  private finishChunk(): void {
    const startSlot = this.seq * this.chunkSize;
    for (let c = 0; c < this.channels; c++) {
      const buf = this.current[c];
      const values = this.used === this.chunkSize ? buf : buf.slice(0, this.used);
      this.quality[c].addChunk(values);
      let any = false;
      for (let i = 0; i < values.length; i++) {
        if (values[i] === values[i]) {
          any = true;
          break;
        }
      }
      if (any) {
        this.ready.push({ channel: c, seq: this.seq, startSlot, startTime: this.startTime + startSlot / this.rate, values });
        this.readyBytes += values.byteLength;
        this.current[c] = new Float64Array(this.chunkSize).fill(NaN);
      } else {
        buf.fill(NaN);
      }
    }
    this.used = 0;
  }

  /** Takes the finished chunks (the caller writes them out). */
  take(): SampleChunk[] {
    const out = this.ready;
    this.ready = [];
    this.readyBytes = 0;
    return out;
  }

  get frames(): number {
    return this.lastSlot + 1;
  }

  qualities(duplicates: number): ChannelQuality[] {
    return this.quality.map((q) => q.result(duplicates));
  }
}
