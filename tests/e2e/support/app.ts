import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll } from 'vitest';
import { launchBrowser } from './browser';
import { startServer, type RunningServer } from './server';

/**
 * The real server on a free port with a fresh database, and Debian's Chromium, for one spec file: started
 * before its tests and stopped after them (`dataDir`: a folder of the test's own, to open its database too).
 * Read `app.server` and `app.browser` inside the tests.
 */
export function useAppInBrowser(
  extraEnv: Record<string, string> = {},
  opts: { dataDir?: string } = {},
): { readonly server: RunningServer; readonly browser: BrowserContext } {
  let server: RunningServer | undefined;
  let browser: BrowserContext | undefined;
  beforeAll(async () => {
    server = await startServer(extraEnv, opts);
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await server?.stop();
  });
  return {
    get server() {
      if (!server) throw new Error('the server is started in beforeAll');
      return server;
    },
    get browser() {
      if (!browser) throw new Error('the browser is started in beforeAll');
      return browser;
    },
  };
}
