import { defineConfig } from '@playwright/test'

const port = Number(process.env.BROWSER_TEST_PORT ?? 3100)
const mailDir = `.data/browser-test-mail-${port}`

// Debian's Chromium, never a downloaded browser; the launcher starts the fakes and the built server
// on its own ports with a fresh in-memory database.
export default defineConfig({
  testDir: '.',
  outputDir: './report/results',
  timeout: 60_000,
  workers: 1,
  reporter: [['list']],
  use: {
    // The address the launcher prints by default; the server itself listens on 127.0.0.1.
    baseURL: `http://localhost:${port}`,
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    },
  },
  projects: [{ name: 'chromium', use: { browserName: 'chromium' } }],
  webServer: {
    // The fake inbox starts empty, as the database does: mails kept from an earlier local run on this port would
    // carry the same order numbers and be counted twice.
    command: `rm -rf ${mailDir} && node --import tsx scripts/start.mjs`,
    cwd: '../..',
    url: `http://127.0.0.1:${port}/api/health`,
    timeout: 240_000,
    reuseExistingServer: false,
    stdout: 'ignore',
    stderr: 'pipe',
    env: {
      PORT: String(port),
      NUXT_DB_DIR: 'memory://',
      NUXT_SESSION_PASSWORD: 'browser-test-session-password-0123456789abcdef',
      NUXT_MAIL_POLL_MS: '200',
      MAIL_FAKE_SMTP_PORT: String(port + 1001),
      MAIL_FAKE_HTTP_PORT: String(port + 1002),
      MAIL_FAKE_DIR: mailDir,
      STRIPE_FAKE_PORT: String(port + 1003),
    },
  },
})
