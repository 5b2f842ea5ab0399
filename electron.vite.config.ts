import { resolve } from 'node:path';
import { defineConfig } from 'electron-vite';

// Our layout is src-main / src-renderer / src-shared, so every input is named
// explicitly (electron-vite's defaults look under src/).
export default defineConfig({
  main: {
    build: {
      outDir: 'out/main',
      rollupOptions: {
        input: {
          index: resolve(__dirname, 'src-main/index.ts'),
          browserHost: resolve(__dirname, 'src-main/hosts/browser/main.ts'),
        },
      },
    },
  },
  preload: {
    build: {
      outDir: 'out/preload',
      rollupOptions: {
        input: { preload: resolve(__dirname, 'src-main/hosts/electron/preload.ts') },
      },
    },
  },
  renderer: {
    root: resolve(__dirname, 'src-renderer'),
    build: {
      outDir: resolve(__dirname, 'out/renderer'),
      rollupOptions: {
        input: { index: resolve(__dirname, 'src-renderer/index.html') },
      },
      // Never inline assets as data: URLs into scripts or styles; keep the CSP simple.
      assetsInlineLimit: 0,
    },
  },
});
