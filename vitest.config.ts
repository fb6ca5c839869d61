import { defineConfig } from 'vitest/config';

// Two suites: `unit` (pure engine and case code, no DOM) and `browser` (Playwright driving real
// Chromium with the built extension; needs `npm run build` first). Both report through vitest so
// CI can sum them into one line.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          // pure modules only: test/extension holds tests of the shell's DOM-free helpers, test/cli the
          // recompute command run as a process, test/house the rules of the source tree itself
          include: ['test/engine/**/*.test.ts', 'test/case/**/*.test.ts', 'test/extension/**/*.test.ts', 'test/cli/**/*.test.ts', 'test/house/**/*.test.ts'],
          environment: 'node',
          // a guard against a hang, not a speed target (those are in npm run bench): the property
          // and coverage tests take seconds, and many times that on a busy two-core machine
          testTimeout: 30_000,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['test/e2e/**/*.test.ts'],
          environment: 'node',
          // one Chromium at a time: the machine has two cores
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 90_000,
          // a figure polled for is computed in the popup's worker: a second (the default) was too
          // little on a busy two-core machine; a wait for what never comes still fails, later
          expect: { poll: { timeout: 15_000 } },
        },
      },
    ],
  },
});
