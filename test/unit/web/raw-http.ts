import net from 'node:net';

export interface RawAnswer {
  /** Status code of the answer, or 0 when the connection closed without one. */
  status: number;
  body: string;
}

/**
 * Sends bytes to a loopback port exactly as given (so that request lines an HTTP client would refuse
 * to send can be tried) and reads the answer until the server closes the connection or the first
 * answer is complete. Gives up after `timeoutMs` with an error.
 */
export function rawRequest(
  port: number,
  head: string | Buffer,
  body: Buffer = Buffer.alloc(0),
  timeoutMs = 10_000,
): Promise<RawAnswer> {
  return new Promise((resolve, reject) => {
    const socket = net.connect({ host: '127.0.0.1', port });
    let received = Buffer.alloc(0);
    let settled = false;
    const finish = () => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      socket.destroy();
      resolve(parseAnswer(received));
    };
    const timer = setTimeout(() => {
      settled = true;
      socket.destroy();
      reject(new Error(`no answer within ${timeoutMs} ms to ${String(head).slice(0, 120)}`));
    }, timeoutMs);
    socket.on('data', (chunk: Buffer) => {
      received = Buffer.concat([received, chunk]);
      if (answerComplete(received)) finish();
    });
    socket.on('error', finish);
    socket.on('close', finish);
    socket.write(head);
    if (body.length > 0) socket.write(body, () => undefined);
  });
}

function headerEnd(bytes: Buffer): number {
  return bytes.indexOf('\r\n\r\n');
}

function answerComplete(bytes: Buffer): boolean {
  const end = headerEnd(bytes);
  if (end < 0) return false;
  const length = /\r\ncontent-length:\s*(\d+)/i.exec(bytes.subarray(0, end).toString('latin1'));
  return length !== null && bytes.length >= end + 4 + Number(length[1]);
}

function parseAnswer(bytes: Buffer): RawAnswer {
  const match = /^HTTP\/1\.[01] (\d{3})/.exec(bytes.subarray(0, 16).toString('latin1'));
  const end = headerEnd(bytes);
  return {
    status: match ? Number(match[1]) : 0,
    body: end < 0 ? '' : bytes.subarray(end + 4).toString('utf8'),
  };
}
