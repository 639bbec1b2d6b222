import { defineConfig } from 'vitest/config';
import SummaryReporter from './testkit/summary-reporter.js';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
    reporters: ['default', new SummaryReporter()],
  },
});
