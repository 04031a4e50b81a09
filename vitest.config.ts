import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts', 'src/**/*.test.ts'],
    testTimeout: 30000,
    hookTimeout: 30000,
    // fsync is most of the suite's time; the writer's own tests (tests/io/) turn it back on.
    env: { TOLRATE_TEST_NO_FSYNC: '1' },
    // vitest's default is one worker fewer than the cores, which is one worker on a 2-core
    // machine; many tests wait on the disk (fsync) rather than the processor, so use them all.
    maxWorkers: Math.max(2, availableParallelism()),
  },
});
