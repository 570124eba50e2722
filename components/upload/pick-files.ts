// Choosing the file(s) of a recording with the platform's document picker. On web the picker
// gives File objects (sent as they are, never read into memory here); native builds give URIs.
import * as DocumentPicker from 'expo-document-picker';
import type { UploadFile } from '@/hooks/use-recordings';

/** What the upload accepts (DESIGN.md §5.5): CSV, or COMTRADE as .cfg + .dat or a single .cff. */
const ACCEPT = ['.csv', '.cfg', '.dat', '.cff', 'text/csv'];

export async function pickRecordingFiles(): Promise<UploadFile[] | null> {
  const res = await DocumentPicker.getDocumentAsync({ type: ACCEPT, multiple: true, base64: false, copyToCacheDirectory: false });
  if (res.canceled || !res.assets?.length) return null;
  return res.assets.map((a) => ({ name: a.name, size: a.size ?? a.file?.size ?? null, file: a.file, uri: a.file ? undefined : a.uri, mimeType: a.mimeType }));
}

const ext = (name: string) => (/\.([A-Za-z0-9]+)$/.exec(name)?.[1] ?? '').toLowerCase();

/** null when the set of files is one the server takes; else what to choose instead. */
export function checkFileSet(files: UploadFile[]): string | null {
  if (files.length === 0) return 'Choose a file first.';
  const exts = files.map((f) => ext(f.name)).sort();
  if (files.length === 1 && ['csv', 'cff'].includes(exts[0])) return null;
  if (files.length === 1 && exts[0] === 'cfg') return 'A COMTRADE .cfg needs its .dat: choose both files together.';
  if (files.length === 1 && exts[0] === 'dat') return 'A COMTRADE .dat needs its .cfg: choose both files together.';
  if (files.length === 2 && exts[0] === 'cfg' && exts[1] === 'dat') return null;
  return 'Choose one .csv or .cff file, or a COMTRADE .cfg together with its .dat.';
}
