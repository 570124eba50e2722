// Text-encoding checks for uploaded text files. Keel reads UTF-8 (ASCII is a subset; a UTF-8
// byte-order mark is skipped). UTF-16/32 files are recognised by their byte-order mark or by NUL
// bytes among the first characters and refused with a clear message instead of being read as
// garbage. Latin-1 / Windows-1252 bytes that are not valid UTF-8 decode to U+FFFD, which the
// readers look for in the cells they use.
import fs from 'node:fs';
import { FileRefusedError } from './errors';

/** Throws when the first bytes show a UTF-16 or UTF-32 file. `label` prefixes the location. */
export async function checkTextEncoding(path: string, label: string): Promise<void> {
  const fh = await fs.promises.open(path, 'r');
  try {
    const head = Buffer.alloc(64);
    const { bytesRead } = await fh.read(head, 0, head.length, 0);
    checkTextHead(head.subarray(0, bytesRead), label);
  } finally {
    await fh.close();
  }
}

export function checkTextHead(head: Buffer, label: string): void {
  const where = label ? `${label} line 1` : 'line 1';
  if (head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))) {
    const order = head[0] === 0xff ? 'FF FE' : 'FE FF';
    throw new FileRefusedError(
      where,
      `the file is UTF-16 encoded (byte-order mark ${order}); save it as UTF-8 or plain ASCII`,
    );
  }
  if (head.length >= 4 && head[0] === 0 && head[1] === 0 && head[2] === 0xfe && head[3] === 0xff) {
    throw new FileRefusedError(where, 'the file is UTF-32 encoded; save it as UTF-8 or plain ASCII');
  }
  const nul = head.indexOf(0);
  if (nul >= 0) {
    throw new FileRefusedError(
      where,
      `NUL byte at byte ${nul + 1}: the file is not UTF-8 text (UTF-16 without a byte-order mark, or a binary file?)`,
    );
  }
}

/** True when a decoded cell holds the replacement character of an invalid UTF-8 sequence. */
export function hasInvalidUtf8(text: string): boolean {
  return text.includes('\uFFFD');
}
