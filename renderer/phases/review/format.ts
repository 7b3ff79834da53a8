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

/** A ratio the way the trade prints it: no leading zero (.83, -.33, 1.00); a dash for "not computed". */
export function ratio(value: number | null | undefined, digits = 2): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '–';
  const fixed = Math.abs(value).toFixed(digits);
  const bare = fixed.startsWith('0.') ? fixed.slice(1) : fixed;
  return (value < 0 && Number(fixed) !== 0 ? '−' : '') + bare;
}

export function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** Offers text as a file download. */
export function downloadText(fileName: string, text: string, type = 'text/csv;charset=utf-8'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.click();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
