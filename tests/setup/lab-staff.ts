import { makeTestApp, type TestApp } from './test-app';

export type Agent = Awaited<ReturnType<TestApp['signedIn']>>;

/**
 * A fresh test app with the demo technologist and director signed in: the pair every workup test needs
 * (the technologist records, the director reads the audit trail and signs out).
 */
export async function makeAppWithLabStaff(): Promise<{ t: TestApp; tech: Agent; director: Agent }> {
  const t = await makeTestApp();
  try {
    return { t, tech: await t.signedIn('technologist'), director: await t.signedIn('director') };
  } catch (err) {
    await t.close();
    throw err;
  }
}
