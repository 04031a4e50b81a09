import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts', 'src/**/*.test.ts'],
    testTimeout: 30000,
    hookTimeout: 30000,
    // vitest's default is one worker fewer than the cores, which is one worker on a 2-core
    // machine; many tests wait on the disk (fsync) rather than the processor, so use them all.
    maxWorkers: Math.max(2, availableParallelism()),
  },
});
