import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';

// Bundle sizes of the web app per route: builds it with Vite into a scratch directory with a
// manifest, then for each lazily loaded view adds up the chunks (and their CSS) that the view
// needs beyond what the entry already loaded. Sizes are raw and gzip (level 9), in KB.

interface ManifestChunk {
  file: string;
  src?: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  css?: string[];
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;

/** Prints the entry's size and each view's extra download (raw and gzip). */
export async function run(): Promise<void> {
  const out = mkdtempSync(path.join(tmpdir(), 'driftline-bundle-'));
  try {
    const build = spawnSync('npx', ['vite', 'build', '--outDir', out, '--manifest', '--logLevel', 'error'], { stdio: 'inherit' });
    if (build.status !== 0) throw new Error('vite build failed');
    const manifest = JSON.parse(readFileSync(path.join(out, '.vite', 'manifest.json'), 'utf8')) as Record<string, ManifestChunk>;
    const sizes = new Map<string, { raw: number; gzip: number }>();
    const size = (file: string) => {
      let s = sizes.get(file);
      if (!s) {
        const bytes = readFileSync(path.join(out, file));
        sizes.set(file, (s = { raw: bytes.length, gzip: gzipSync(bytes, { level: 9 }).length }));
      }
      return s;
    };
    // Every file a chunk loads statically: its own JS and CSS and those of its static imports.
    const closure = (key: string, into = new Set<string>()) => {
      const chunk = manifest[key];
      if (!chunk || into.has(chunk.file)) return into;
      into.add(chunk.file);
      for (const css of chunk.css ?? []) into.add(css);
      for (const dep of chunk.imports ?? []) closure(dep, into);
      return into;
    };
    const total = (files: Iterable<string>) => [...files].reduce((a, f) => ({ raw: a.raw + size(f).raw, gzip: a.gzip + size(f).gzip }), { raw: 0, gzip: 0 });
    const entryKey = Object.keys(manifest).find((k) => manifest[k].isEntry)!;
    const entry = closure(entryKey);
    const e = total(entry);
    console.log(`entry (index.html: app shell, router, PrimeVue, Lato): ${kb(e.raw)} raw, ${kb(e.gzip)} gzip`);
    const views = Object.keys(manifest).filter((k) => manifest[k].isDynamicEntry && k.startsWith('src/views/')).sort();
    for (const key of views) {
      const extra = [...closure(key)].filter((f) => !entry.has(f));
      const v = total(extra);
      console.log(`${path.basename(key, '.vue')}: +${kb(v.raw)} raw, +${kb(v.gzip)} gzip beyond the entry`);
    }
  } finally {
    rmSync(out, { recursive: true, force: true });
  }
}
