/** Early refusals of requests that carry a file: the client must read the answer, not a broken pipe. */
import type { Request, Response } from 'express';

/** Bodies up to this size are read and dropped before an early refusal, so that the client reads the answer. */
const DRAIN_LIMIT_BYTES = 16 * 1024 * 1024;

/**
 * Reads and drops the body of a request refused before its upload was read. Note: answering while the client
 * is still sending makes some clients fail with EPIPE instead of showing the answer; a larger body is not
 * worth reading, so its connection closes after the answer instead.
 */
export async function discardBody(req: Request, res: Response): Promise<void> {
  const declared = Number(req.headers['content-length']);
  if (req.readableEnded) return;
  if (!Number.isFinite(declared) || declared > DRAIN_LIMIT_BYTES) {
    res.setHeader('Connection', 'close');
    return;
  }
  await new Promise<void>((resolve) => {
    req.on('end', resolve).on('error', () => resolve()).on('close', resolve);
    req.resume();
  });
}
