/**
 * A signal that fires when the client goes away before its answer is sent, so the
 * compute pool can stop work nobody will read.
 */
import type { FastifyReply } from 'fastify';

export function clientGone(reply: FastifyReply): AbortSignal {
  const controller = new AbortController();
  const response = reply.raw;
  // 'close' also fires after a normal answer; only an unfinished response means the client left.
  response.once('close', () => {
    if (!response.writableFinished) controller.abort();
  });
  return controller.signal;
}
