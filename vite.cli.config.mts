// The command line, bundled with the project's own build tool (vite) so that `rankfill`
// starts without compiling TypeScript: out/cli/rankfill.js (entry) and out/cli/pool.worker.js
// (the engine pool's worker). Node built-ins stay external; our pure dependencies are bundled.
import { builtinModules } from 'node:module';
import { resolve } from 'node:path';
import { defineConfig } from 'vite';

const root = import.meta.dirname;

export default defineConfig({
  build: {
    outDir: resolve(root, 'out/cli'),
    emptyOutDir: true,
    ssr: true,
    target: 'node20',
    minify: false,
    sourcemap: false,
    rollupOptions: {
      input: {
        rankfill: resolve(root, 'src-main/cli/entry.ts'),
        'pool.worker': resolve(root, 'src-main/pool/pool.worker.ts'),
      },
      external: [...builtinModules, ...builtinModules.map((m) => `node:${m}`)],
      output: { format: 'cjs', entryFileNames: '[name].js', chunkFileNames: 'chunks/[name]-[hash].js' },
    },
  },
  ssr: { noExternal: true, target: 'node' },
});
