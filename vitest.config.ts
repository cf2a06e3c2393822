import { defineConfig, mergeConfig } from 'vitest/config';
import viteConfig from './vite.config.ts';

// The app's own Vite settings (the Vue plugin, the @ and @shared aliases), plus what tests need.
export default mergeConfig(
  viteConfig,
  defineConfig({
    test: {
      include: ['tests/**/*.test.ts'],
      testTimeout: 20_000,
      hookTimeout: 60_000,
      // Server tests share one database; files run one at a time to keep them independent.
      fileParallelism: false,
    },
  }),
);
