import type { Response } from 'superagent';

/** A supertest parser that keeps a response's body as the bytes sent, for PDFs and workbooks: `.buffer(true).parse(binary)`. */
export function binary(res: Response, cb: (err: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
}
