import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { fileURLToPath } from 'node:url';

// The API server in development; WATERLINE_API points elsewhere (e.g. a second checkout on another port).
const api = process.env.WATERLINE_API ?? 'http://127.0.0.1:3000';

/**
 * Large libraries get chunks of their own, so no single file is huge and they cache apart from our
 * code. `entriesAware` splits naive-ui by who loads it: the part the shell needs on every page, and
 * the part (the data table and its paging) only the list views load.
 */
const vendorGroups = [
  // Highest priority first, so Vue itself lands here and not inside a library that imports it.
  { name: 'vue-vendor', test: /[\\/]node_modules[\\/](vue|@vue|vue-router|pinia)[\\/]/, priority: 40 },
  { name: 'fullcalendar', test: /[\\/]node_modules[\\/]@fullcalendar[\\/]/, priority: 30 },
  {
    name: 'naive-ui',
    test: /[\\/]node_modules[\\/](naive-ui|vueuc|vooks|seemly|css-render|@css-render|treemate|evtd|vdirs|date-fns|date-fns-tz|async-validator|lodash-es|@juggle|@emotion)[\\/]/,
    priority: 20,
    entriesAware: true,
    entriesAwareMergeThreshold: 20_000,
  },
];

export default defineConfig({
  plugins: [vue()],
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  server: {
    proxy: {
      '/api': { target: api, changeOrigin: false },
      '/auth': { target: api, changeOrigin: false },
    },
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    rolldownOptions: {
      output: {
        codeSplitting: { groups: vendorGroups },
        // entriesAware names list every view that shares a chunk; keep file names short.
        chunkFileNames: (chunk) => `assets/${chunk.name.split('~')[0]}-[hash].js`,
      },
    },
  },
});
