import type { AddressInfo } from 'node:net';
import express from 'express';
import { Sequelize } from 'sequelize';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { writeTransaction, writesInFlight } from '../../../../server/db/write-transaction';
import { limitReadsWhileWriting } from '../../../../server/lib/read-gate';

/*
 * The read gate (server/lib/read-gate.ts) in front of a real HTTP server, with a real write transaction on an
 * in-memory SQLite database holding the queue open. What is checked:
 * - GET and HEAD are the safe, read-only methods; POST, PUT, PATCH and DELETE are not (RFC 9110 §9.2.1
 *   [confirmed]); only the former are held back.
 * - While a write waits or runs, at most `concurrency` reads are worked on, in arrival order (p-limit's documented
 *   FIFO queue [confirmed: p-limit README]); with no write, reads are not held back (the module's contract).
 * - A slot is given back when the answer is finished or the connection closes (Node's http.ServerResponse
 *   'finish' and 'close' events [confirmed: Node.js http docs]); a read whose client left while it waited is never
 *   handed to the route [common practice: do no work for a client that has gone].
 */

const sequelize = new Sequelize('sqlite::memory:', { logging: false });
afterAll(() => sequelize.close());

type Held = { id: string; method: string; answer: () => void };

/** An app behind the gate whose GET/HEAD route answers only when the test says so. */
async function gatedApp(concurrency: number) {
  const inside: Held[] = [];
  const entered: string[] = [];
  const app = express();
  app.use(limitReadsWhileWriting(concurrency));
  const hold: express.RequestHandler = (req, res) => {
    const id = String(req.query.id);
    entered.push(id);
    const held: Held = {
      id,
      method: req.method,
      answer: () => {
        inside.splice(inside.indexOf(held), 1);
        res.json({ id });
      },
    };
    inside.push(held);
    res.once('close', () => {
      if (inside.includes(held)) inside.splice(inside.indexOf(held), 1);
    });
  };
  app.get('/r', hold);
  app.head('/r', hold);
  for (const m of ['post', 'put', 'patch', 'delete'] as const) app[m]('/w', (req, res) => void res.json({ method: req.method }));
  const server = app.listen(0, '127.0.0.1');
  await new Promise((listening) => server.once('listening', listening));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  servers.push(server);
  return { url, inside, entered };
}

const servers: ReturnType<express.Express['listen']>[] = [];
const writes: (() => void)[] = [];
afterEach(async () => {
  writes.splice(0).forEach((finish) => finish());
  await until(() => writesInFlight() === 0);
  for (const s of servers.splice(0)) {
    s.closeAllConnections();
    s.close();
  }
});

async function until(condition: () => boolean): Promise<void> {
  while (!condition()) await new Promise((r) => setTimeout(r, 5));
}
/** Lets pending I/O and callbacks run, so a request the gate would wrongly admit has the chance to arrive. */
const settle = async () => {
  for (let i = 0; i < 10; i++) await new Promise((r) => setTimeout(r, 5));
};

/** Starts a write transaction that stays open until `finish` is called. */
async function openWrite(): Promise<{ finish: () => void; done: Promise<void> }> {
  let finish!: () => void;
  let ready!: () => void;
  const started = new Promise<void>((r) => (ready = r));
  const done = writeTransaction(sequelize, () => {
    ready();
    return new Promise<void>((r) => (finish = r));
  });
  await started;
  writes.push(finish);
  return { finish, done };
}

/** A read; a connection cut at the end of a test (or by the test) answers status 0 instead of rejecting. */
const read = (url: string, id: string, init: RequestInit = {}) =>
  fetch(`${url}/r?id=${id}`, init).catch(() => ({ status: 0 }));

describe('limitReadsWhileWriting', () => {
  it('when no write is in flight, then every read is worked on at once, even with a limit of one', async () => {
    const { url, inside } = await gatedApp(1);
    const reads = ['a', 'b', 'c'].map((id) => read(url, id));
    await until(() => inside.length === 3);
    inside.slice().forEach((h) => h.answer());
    expect((await Promise.all(reads)).map((r) => r.status)).toEqual([200, 200, 200]);
  });

  it('when a write is in flight, then GET and HEAD both wait for the one slot, in arrival order, and each answer frees it', async () => {
    const { url, inside, entered } = await gatedApp(1);
    await openWrite();
    const first = read(url, '1');
    await until(() => inside.length === 1);
    const second = read(url, '2', { method: 'HEAD' });
    await settle();
    const third = read(url, '3');
    await settle();
    expect(entered).toEqual(['1']);
    inside[0]!.answer();
    await until(() => entered.length === 2);
    expect(inside.map((h) => [h.id, h.method])).toEqual([['2', 'HEAD']]);
    inside[0]!.answer();
    await until(() => entered.length === 3);
    expect(inside.map((h) => h.id)).toEqual(['3']);
    inside[0]!.answer();
    expect((await Promise.all([first, second, third])).map((r) => r.status)).toEqual([200, 200, 200]);
  });

  it('when a write is in flight and the reads are held, then POST, PUT, PATCH and DELETE are not held', async () => {
    const { url, inside } = await gatedApp(1);
    await openWrite();
    void read(url, 'held');
    await until(() => inside.length === 1);
    for (const method of ['POST', 'PUT', 'PATCH', 'DELETE']) {
      const res = await fetch(`${url}/w`, { method });
      expect(await res.json()).toEqual({ method });
    }
    expect(inside.map((h) => h.id)).toEqual(['held']);
  });

  it('when the write ends while reads wait, then the next read lifts the limit and every waiting read goes on', async () => {
    const { url, inside } = await gatedApp(1);
    const write = await openWrite();
    void read(url, 'w1');
    await until(() => inside.length === 1);
    void read(url, 'w2');
    void read(url, 'w3');
    await settle();
    expect(inside.length).toBe(1);
    write.finish();
    await write.done;
    expect(writesInFlight()).toBe(0);
    // No slot has been given back; the read arriving now finds reads waiting but no write.
    void read(url, 'after');
    await until(() => inside.length === 4);
    expect(inside.map((h) => h.id).sort()).toEqual(['after', 'w1', 'w2', 'w3']);
  });

  it('when the client of a read that holds the slot goes away, then the slot is given to the next read', async () => {
    const { url, inside, entered } = await gatedApp(1);
    await openWrite();
    const gone = new AbortController();
    const abandoned = read(url, 'gone', { signal: gone.signal });
    await until(() => inside.length === 1);
    void read(url, 'next');
    await settle();
    expect(entered).toEqual(['gone']);
    gone.abort();
    await abandoned;
    await until(() => entered.length === 2);
    expect(entered).toEqual(['gone', 'next']);
  });

  it('when a waiting read\'s client goes away, then that read never reaches the route and the one after it does', async () => {
    const { url, inside, entered } = await gatedApp(1);
    await openWrite();
    void read(url, 'first');
    await until(() => inside.length === 1);
    const gone = new AbortController();
    const abandoned = read(url, 'left', { signal: gone.signal });
    await settle();
    void read(url, 'last');
    await settle();
    gone.abort();
    await abandoned;
    await settle();
    inside[0]!.answer();
    await until(() => entered.length === 2);
    await settle();
    expect(entered).toEqual(['first', 'last']);
  });

  it('with a limit of two while a write is in flight, then exactly two reads are worked on at once', async () => {
    const { url, inside } = await gatedApp(2);
    await openWrite();
    for (const id of ['p', 'q', 'r', 's']) void read(url, id);
    await until(() => inside.length === 2);
    await settle();
    expect(inside.length).toBe(2);
  });
});
