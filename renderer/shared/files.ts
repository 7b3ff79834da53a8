import { count, unbounded } from '../../app/api/format.ts';
/** Chunk size for turning bytes into a binary string (keeps String.fromCharCode within argument limits). */
const CHUNK = 0x8000;

/** A chosen file's bytes as base64, the form commands take files in. */
export async function readFileBase64(file: File): Promise<string> {
  const bytes = new Uint8Array(await file.arrayBuffer());
  let binary = '';
  for (let i = 0; i < bytes.length; i += CHUNK) {
    binary += String.fromCharCode(...bytes.subarray(i, i + CHUNK));
  }
  return btoa(binary);
}

/** Offers text as a file download (exports). */
export function downloadText(fileName: string, text: string, type = 'text/csv;charset=utf-8'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.click();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}

/** "12.3 KB" for file sizes. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${count(bytes)} bytes`;
  if (bytes < 1024 * 1024) return `${unbounded(bytes / 1024, 1)} KB`;
  return `${unbounded(bytes / 1024 / 1024, 1)} MB`;
}

/** Offers bytes sent as base64 (a PDF, a file of any kind) as a file download. */
export function downloadBase64(fileName: string, base64: string, type: string): void {
  const binary = atob(base64);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i);
  const url = URL.createObjectURL(new Blob([bytes], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.click();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
