import type { RequestHandler } from 'express';
import pLimit from 'p-limit';
import { writesInFlight } from '../db/write-transaction';

/**
 * While any write transaction is queued or running, at most `concurrency` API reads (GET and HEAD) are worked on
 * at once; the rest wait their turn in arrival order. With no write in flight, reads are not held back.
 *
 * Why: Node runs every request's JavaScript on one thread, and each SQL statement of a write hands control back
 * to that thread and waits for its turn there. Writes are one at a time (SQLite has one writer), so every reader
 * in flight lengthened every statement of every queued write. Holding most reads at the door while writes wait
 * keeps the writers' queue short; reads were sharing a busy CPU anyway. A slot is freed when the answer is
 * finished or the client has gone.
 */
export function limitReadsWhileWriting(concurrency: number): RequestHandler {
  const limit = pLimit(concurrency);
  return (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    const writing = writesInFlight() > 0;
    // No write waiting and no read held: nothing to order, so the read goes straight on (and is not counted).
    if (!writing && limit.pendingCount === 0) return next();
    limit.concurrency = writing ? concurrency : Number.POSITIVE_INFINITY;
    void limit(
      () =>
        new Promise<void>((release) => {
          res.once('close', release);
          res.once('finish', release);
          if (req.destroyed) release();
          else next();
        }),
    );
  };
}
