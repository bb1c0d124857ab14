import type { Agent } from './lab-staff';
import type { TestApp } from './test-app';

type Account = Parameters<TestApp['signedIn']>[0];

/** One agent per demo account asked for, signed in in parallel, in the order given. */
export async function signInAll<const A extends readonly Account[]>(t: TestApp, accounts: A): Promise<{ -readonly [K in keyof A]: Agent }> {
  return (await Promise.all(accounts.map((a) => t.signedIn(a)))) as { -readonly [K in keyof A]: Agent };
}
