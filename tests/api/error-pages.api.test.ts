import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

// What Chromium sends when a person types or follows a link [common practice: the browser's navigation Accept header].
const BROWSER_ACCEPT = 'text/html,application/xhtml+xml,application/xml;q=0.9,image/avif,image/webp,*/*;q=0.8';

describe('an API link opened in a browser', () => {
  it('when a signed-out browser opens an API link, then it gets a readable 401 page that offers to sign in, not JSON', async () => {
    const res = await t.agent().get('/api/cases').set('Accept', BROWSER_ACCEPT);
    expect(res.status).toBe(401);
    expect(res.headers['content-type']).toMatch(/^text\/html/);
    expect(res.text).toContain('<h1>Please sign in first</h1>');
    expect(res.text).toContain('href="/sign-in"');
    expect(res.text).not.toContain('{"error"');
  });

  it("when a clinician's browser opens a laboratory API link, then a readable 403 page says it is not part of the role", async () => {
    const clinician = await t.signedIn('clinician');
    const res = await clinician.get('/api/cases').set('Accept', BROWSER_ACCEPT);
    expect(res.status).toBe(403);
    expect(res.headers['content-type']).toMatch(/^text\/html/);
    expect(res.text).toContain('This is not part of your role');
  });

  it('when a browser opens an API address that does not exist, then a readable 404 page, with the message escaped', async () => {
    const res = await t.agent().get('/api/no-such-thing/<b>x</b>').set('Accept', BROWSER_ACCEPT);
    expect(res.status).toBe(404);
    expect(res.text).toContain('Nothing at this address');
    expect(res.text).not.toContain('<b>x</b>');
  });

  it.each([
    ['application/json', 'application/json'],
    ['anything', '*/*'],
  ])('when an API client asks for %s, then the same error stays the JSON body', async (_what, accept) => {
    const res = await t.agent().get('/api/cases').set('Accept', accept);
    expect(res.status).toBe(401);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    expect(res.body.error.code).toBe('UNAUTHENTICATED');
  });

  it('when a form-like POST asks for HTML, then it still gets JSON (only a GET opened in the browser gets a page)', async () => {
    const res = await t.agent().post('/api/cases').set('Accept', BROWSER_ACCEPT).send({});
    expect(res.status).toBe(401);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
  });
});
