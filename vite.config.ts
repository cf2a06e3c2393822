import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { VitePWA } from 'vite-plugin-pwa';
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

/**
 * The service worker (src/service-worker/sw.ts), built to /sw.js. It keeps ahead of use what any
 * page needs to open without a signal: the page, the shell's code and styles, the fonts. The
 * board, its timeline library and the reports' charts are kept only once opened (most phones on
 * site never open them). No manifest: the app is not offered for installing.
 */
const serviceWorker = VitePWA({
  strategies: 'injectManifest',
  srcDir: 'src/service-worker',
  filename: 'sw.ts',
  injectRegister: false,
  manifest: false,
  injectManifest: {
    globPatterns: ['index.html', 'favicon.svg', 'assets/*.{js,css,woff2}'],
    globIgnores: ['assets/BoardView-*', 'assets/fullcalendar-*', 'assets/ReportCharts-*'],
  },
});

export default defineConfig({
  plugins: [vue(), serviceWorker],
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
