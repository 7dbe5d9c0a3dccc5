/// <reference types="vitest/config" />
import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';

const serverPort = Number(process.env.PORT ?? 5170);

export default defineConfig({
  plugins: [vue()],
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    chunkSizeWarningLimit: 700,
    rolldownOptions: {
      output: {
        // Element Plus and uPlot are large; keep them out of the app chunk so pages load lazily.
        codeSplitting: {
          groups: [
            { name: 'element-plus', test: /node_modules[\\/](element-plus|@element-plus)/ },
            { name: 'uplot', test: /node_modules[\\/]uplot/ },
            { name: 'vue', test: /node_modules[\\/](@vue|vue|vue-router|pinia)[\\/]/ },
          ],
        },
      },
    },
  },
  server: {
    proxy: {
      '/api': { target: `http://127.0.0.1:${serverPort}`, ws: true },
      '/ws': { target: `ws://127.0.0.1:${serverPort}`, ws: true },
    },
  },
  test: {
    reporters: ['default', ['json', { outputFile: 'test-results/vitest.json' }]],
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          environment: 'node',
          include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts',
                    'tests/simulator/**/*.test.ts', 'tests/cli/**/*.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'client',
          environment: 'happy-dom',
          include: ['tests/src/**/*.test.ts'],
          // Generous: CI shares two cores between the type check, workers and the browser.
          testTimeout: 30_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          environment: 'node',
          include: ['tests/e2e/**/*.test.ts'],
          globalSetup: ['tests/e2e/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
