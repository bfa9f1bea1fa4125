import { defineConfig } from '@playwright/test';

// PW_PORT lets two developers run e2e at once: each gets its own port and its own build folder.
const port = Number(process.env.PW_PORT ?? 4173);
const outDir = port === 4173 ? 'dist' : `dist-e2e-${port}`;

// Test tools cannot download browsers here: use Debian's chromium.
export default defineConfig({
  testDir: 'e2e',
  timeout: 90_000,
  retries: 0,
  workers: 1,
  reporter: [['list']],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    viewport: { width: 1280, height: 800 },
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: [
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
  webServer: {
    command:
      `npx vite build --outDir ${outDir} && ` +
      `npx vite preview --outDir ${outDir} --host 127.0.0.1 --port ${port} --strictPort`,
    url: `http://127.0.0.1:${port}`,
    reuseExistingServer: false,
    timeout: 180_000,
  },
});
