/**
 * How much one batch analysis of a recording allocates (decode, timing report, shape analysis of the
 * first 60 s, as `batch` runs on every file), and where: V8's sampling heap profiler over the second
 * of two analyses in one process (the first warms the engine up), counting objects already collected
 * too. Short-lived objects cost the garbage collector, which in a batch with a worker per core has
 * no idle core to run on. Sampling: figures vary by about ±10 % from run to run.
 *
 *   npx tsx bench/allocation.ts FILE.wav [--top N]   (runs the built code in dist/: npm run build)
 */
import { existsSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { fileURLToPath, pathToFileURL } from 'node:url';

interface ProfileNode {
  callFrame: { functionName: string; url: string; lineNumber: number };
  selfSize: number;
  children: ProfileNode[];
}

const file = process.argv[2];
if (!file || !existsSync(file)) {
  process.stderr.write('usage: npx tsx bench/allocation.ts FILE.wav [--top N]\n');
  process.exit(2);
}
const top = process.argv.includes('--top') ? Number(process.argv[process.argv.indexOf('--top') + 1]) : 15;
const entry = fileURLToPath(new URL('../dist/cli/analyze-recording.js', import.meta.url));
if (!existsSync(entry)) {
  process.stderr.write('bench/allocation.ts runs the built code: npm run build first\n');
  process.exit(2);
}
const { analyzeRecording } = (await import(pathToFileURL(entry).href)) as {
  analyzeRecording: (path: string, options: Record<string, unknown>) => Promise<unknown>;
};

await analyzeRecording(file, {});
const session = new Session();
session.connect();
await session.post('HeapProfiler.startSampling', {
  samplingInterval: 1024,
  includeObjectsCollectedByMajorGC: true,
  includeObjectsCollectedByMinorGC: true,
});
await analyzeRecording(file, {});
const { profile } = (await session.post('HeapProfiler.stopSampling')) as { profile: { head: ProfileNode } };
session.disconnect();

const bySite = new Map<string, number>();
const walk = (node: ProfileNode): void => {
  const f = node.callFrame;
  const site = `${f.functionName || '(anonymous)'} ${f.url ? `${f.url.split('/').slice(-2).join('/')}:${f.lineNumber + 1}` : '(engine)'}`;
  if (node.selfSize > 0) bySite.set(site, (bySite.get(site) ?? 0) + node.selfSize);
  for (const child of node.children) walk(child);
};
walk(profile.head);
const total = [...bySite.values()].reduce((a, b) => a + b, 0);
process.stdout.write(`${file}: one batch analysis allocated ${(total / 1e6).toFixed(1)} MB (sampled)\n`);
process.stdout.write('| MB | function (built file:line) |\n|---:|---|\n');
for (const [site, bytes] of [...bySite].sort((a, b) => b[1] - a[1]).slice(0, top)) {
  process.stdout.write(`| ${(bytes / 1e6).toFixed(1)} | ${site} |\n`);
}
