import { defineConfig } from 'vitest/config';

// Unit suites only: pure engine and case code, no DOM. The browser suite runs through Playwright.
export default defineConfig({
  test: {
    include: ['test/engine/**/*.test.ts', 'test/case/**/*.test.ts'],
    environment: 'node',
  },
});
