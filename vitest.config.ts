import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    // the command-line tests run bin/singleshot.js, i.e. the compiled dist/: build it first
    globalSetup: ['test/support/build-dist.ts'],
  },
});
