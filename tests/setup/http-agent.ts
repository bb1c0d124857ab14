import type { Express } from 'express';
import request from 'supertest';

/** A supertest agent (an in-process app, or a running server's origin) that sends `origin` like a browser. */
export function originAgent(target: Express | string, origin: string) {
  const a = request.agent(target);
  a.set('Origin', origin);
  return a;
}

/** An agent signed in with the given account; throws with the server's answer if sign-in fails. */
export async function signedInAgent(target: Express | string, origin: string, email: string, password: string) {
  const a = originAgent(target, origin);
  const res = await a.post('/api/auth/login').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status} ${JSON.stringify(res.body)}`);
  return a;
}
