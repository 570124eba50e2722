// Data-quality summary of one channel over a whole recording, accumulated sample by sample while
// the file streams in. The definitions are those of modal/preprocess.ts windowQuality (so a
// recording's summary and a window's flags mean the same thing):
//  - dropouts: missing samples (empty cells, and every channel's samples in missing frames);
//  - gaps: runs of missing samples; longestGap: the longest run, in samples;
//  - flatLine: samples in runs of identical consecutive values lasting ≥ 1 s (ceil(rate) samples),
//    a frozen PMU output;
//  - outliers: samples farther than 6 robust standard deviations (1.4826·MAD) from the median.
//    The median and MAD cannot be streamed exactly over an hour of data, and a channel drifts over
//    an hour anyway, so they are taken per stored chunk (a minute or two of data) — a local
//    spike test. Counted by windowQuality on each chunk.
//  - duplicates: rows repeated verbatim in the file (same time, same values), dropped on reading;
//    the count is the file's, the same for every channel.
import { windowQuality } from '../../modal/preprocess';

export interface ChannelQuality {
  samples: number;
  dropouts: number;
  gaps: number;
  longestGap: number;
  flatLine: number;
  outliers: number;
  duplicates: number;
}

export class QualityAccumulator {
  private samples = 0;
  private dropouts = 0;
  private gaps = 0;
  private longestGap = 0;
  private gapRun = 0;
  private flatLine = 0;
  private runValue = NaN;
  private runLength = 0;
  private outliers = 0;
  private readonly minFlat: number;

  constructor(private readonly rate: number) {
    this.minFlat = Math.max(2, Math.ceil(rate));
  }

  add(v: number): void {
    this.samples++;
    if (v !== v) {
      this.dropouts++;
      if (this.gapRun === 0) this.gaps++;
      this.gapRun++;
      if (this.gapRun > this.longestGap) this.longestGap = this.gapRun;
      this.closeRun();
      return;
    }
    this.gapRun = 0;
    if (v === this.runValue) {
      this.runLength++;
    } else {
      this.closeRun();
      this.runValue = v;
      this.runLength = 1;
    }
  }

  /** `n` missing samples in a row (a gap in the file's times). */
  addMissing(n: number): void {
    if (n <= 0) return;
    this.samples += n;
    this.dropouts += n;
    if (this.gapRun === 0) this.gaps++;
    this.gapRun += n;
    if (this.gapRun > this.longestGap) this.longestGap = this.gapRun;
    this.closeRun();
  }

  /** Counts the spike outliers of one finished chunk of this channel. */
  addChunk(values: Float64Array): void {
    this.outliers += windowQuality(values, this.rate).outliers;
  }

  private closeRun(): void {
    if (this.runLength >= this.minFlat) this.flatLine += this.runLength;
    this.runValue = NaN;
    this.runLength = 0;
  }

  result(duplicates: number): ChannelQuality {
    this.closeRun();
    return {
      samples: this.samples,
      dropouts: this.dropouts,
      gaps: this.gaps,
      longestGap: this.longestGap,
      flatLine: this.flatLine,
      outliers: this.outliers,
      duplicates,
    };
  }
}
