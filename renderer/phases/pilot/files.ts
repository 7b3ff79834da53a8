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
