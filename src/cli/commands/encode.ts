import { Option, type Command } from 'commander';
import { InputError } from '../../core/errors.js';
import { formatJson } from '../../io/json.js';
import { EDGE_KINDS, type EdgeKind } from '../../core/signal/edges.js';
import { synthesizeTone } from '../../core/signal/synth.js';
import { planKeying, type KeyingPlan } from '../../core/timing/plan.js';
import { EXPORT_FORMATS, formatFromPath, planToBits, planToCHeader, planToCsv, planToJson, SAFETY_NOTE, type ExportFormat } from '../../io/export.js';
import { readInputFile, writeOutputFile } from '../../io/files.js';
import { encodeWav } from '../../io/wav-write.js';
import type { CommandContext } from '../io.js';
import { numberIn, oneOf } from '../options.js';

export interface EncodeCliOptions {
  in?: string;
  wpm: number;
  farnsworth?: number;
  weight: number;
  compensation: number;
  pttLead: number;
  pttTail: number;
  repeat: number;
  every?: number;
  format?: ExportFormat;
  out?: string;
  force?: boolean;
  json?: boolean;
  tickHz: number;
  name: string;
  rate: number;
  tone: number;
  level: number;
  edge: EdgeKind;
  rise: number;
  pad: number;
  substitute?: boolean;
}

/** Adds the planning options shared by `encode` and `timing --expect`. */
export function addPlanOptions(cmd: Command): Command {
  return cmd
    .option('-w, --wpm <wpm>', 'character speed in words per minute (PARIS, 1–100)', numberIn('--wpm', 1, 100), 20)
    .option('--farnsworth <wpm>', 'overall speed with Farnsworth spacing (wpm, below --wpm)', numberIn('--farnsworth', 1, 100))
    .option('--weight <pct>', 'weighting: dot share of dot + element gap (%, 10–90; 50 = standard)', numberIn('--weight', 10, 90), 50)
    .option('--compensation <ms>', 'keying compensation: lengthen each mark and shorten the next gap (ms)', numberIn('--compensation', -1000, 1000), 0)
    .option('--ptt-lead <ms>', 'PTT (transmit enable) lead before the first mark (ms, 0–10000)', numberIn('--ptt-lead', 0, 10_000), 0)
    .option('--ptt-tail <ms>', 'PTT tail after the last mark (ms, 0–10000)', numberIn('--ptt-tail', 0, 10_000), 0)
    .option('--repeat <n>', 'send the message n times (beacon, 1–10000)', numberIn('--repeat', 1, 10_000, { integer: true }), 1)
    .option('--every <s>', 'repeat period, start to start (seconds)', numberIn('--every', 0.001, 86_400))
    .option('--substitute', 'send look-alikes for characters outside ITU-R M.1677-1, drop the rest (with warnings)');
}

/** Reads the message from the argument or `--in FILE`. */
export async function messageFrom(text: string | undefined, inFile: string | undefined): Promise<string> {
  if (text !== undefined && inFile !== undefined) throw new InputError('give the message as TEXT or with --in FILE, not both');
  if (inFile !== undefined) return (await readInputFile(inFile)).toString('utf8');
  if (text === undefined) throw new InputError('no message: give TEXT or --in FILE');
  return text;
}

export function planFromCli(message: string, o: EncodeCliOptions): KeyingPlan {
  return planKeying(message, {
    wpm: o.wpm,
    farnsworthWpm: o.farnsworth ?? null,
    weightPct: o.weight,
    compensationMs: o.compensation,
    pttLeadMs: o.pttLead,
    pttTailMs: o.pttTail,
    repeat: o.repeat,
    everyS: o.every ?? null,
    substitute: o.substitute,
  });
}

/** Renders a plan in one of the export formats. */
export function renderPlan(plan: KeyingPlan, format: ExportFormat, o: EncodeCliOptions, ctx: CommandContext): string | Buffer {
  switch (format) {
    case 'json':
      return formatJson(planToJson(plan));
    case 'csv':
      return planToCsv(plan);
    case 'c':
      return planToCHeader(plan, o.tickHz, o.name);
    case 'bits': {
      const { text, exact } = planToBits(plan);
      if (!exact) ctx.warn('some edges are not on the unit grid (Farnsworth, weighting or compensation); rounded to the nearest unit');
      return text;
    }
    case 'wav': {
      const tone = synthesizeTone({
        marks: plan.marks,
        sampleRate: o.rate,
        toneHz: o.tone,
        levelDb: o.level,
        edge: o.edge,
        riseMs: o.rise,
        padMs: o.pad,
      });
      return encodeWav({ sampleRate: o.rate, channels: [tone.samples], encoding: 's16' });
    }
  }
}

export function registerEncode(program: Command, ctx: CommandContext): void {
  const cmd = program
    .command('encode')
    .argument('[text]', 'the message; prosigns as <AR>, <SK>, <BT>, <KN> …')
    .summary('plan the keying of a message: JSON, CSV, C header, unit bits or WAV')
    .description(
      'Turn a message into an exact keying timeline (ITU-R M.1677-1 spacing, PARIS word timing).\n' +
        'The format comes from --format or the extension of --out (.json .csv .h .bits .wav); JSON on stdout by default.',
    )
    .option('--in <file>', 'read the message from a text file');
  addPlanOptions(cmd)
    .addOption(new Option('-f, --format <format>', 'output format').argParser(oneOf('--format', EXPORT_FORMATS)).choices(EXPORT_FORMATS))
    .option('-o, --out <file>', 'write to this file (atomically) instead of stdout')
    .option('--force', 'replace --out if it exists')
    .option('--json', 'with --out: print a JSON summary of the plan on stdout')
    .option('--tick-hz <hz>', 'C header: timer tick rate (Hz)', numberIn('--tick-hz', 1, 10_000_000), 1000)
    .option('--name <name>', 'C header: identifier prefix', 'keying')
    .option('--rate <hz>', 'WAV: sample rate (Hz, 8000–192000)', numberIn('--rate', 8000, 192_000, { integer: true }), 48000)
    .option('--tone <hz>', 'WAV: tone frequency (Hz)', numberIn('--tone', 1, 96_000), 700)
    .option('--level <dbfs>', 'WAV: peak level (dBFS, −120–0)', numberIn('--level', -120, 0), -6)
    .addOption(new Option('--edge <kind>', 'WAV: edge shape').argParser(oneOf('--edge', EDGE_KINDS)).default('raised-cosine'))
    .option('--rise <ms>', 'WAV: 10–90 % rise and fall time (ms, 0–50; about 5 ms is common practice)', numberIn('--rise', 0, 50), 5)
    .option('--pad <ms>', 'WAV: silence before and after the message (ms)', numberIn('--pad', 0, 600_000), 250)
    .addHelpText(
      'after',
      `
Examples:
  keyform encode "Q7ZKT TEST" --wpm 20
  keyform encode "VVV Q7ZKT/B JO01" --wpm 18 --farnsworth 12 --out beacon.csv
  keyform encode "Q7ZKT/B" --repeat 10 --every 30 --tick-hz 1000 --name beacon --out beacon.h
  keyform encode "Q7ZKT TEST <AR>" --edge raised-cosine --rise 5 --out test.wav

Caution: ${SAFETY_NOTE}`,
    )
    .action(async (text: string | undefined, o: EncodeCliOptions) => {
      const message = await messageFrom(text, o.in);
      const plan = planFromCli(message, o);
      for (const w of plan.warnings) ctx.warn(w);
      const format = o.format ?? (o.out ? formatFromPath(o.out) : undefined) ?? (o.json ? 'json' : undefined) ?? 'json';
      if (format === 'wav' && !o.out) throw new InputError('--format wav needs --out FILE');
      const data = renderPlan(plan, format, o, ctx);
      if (!o.out) {
        ctx.io.stdout.write(data);
        return;
      }
      await writeOutputFile(o.out, data, { force: o.force });
      const seconds = ((plan.ptt.length > 0 ? plan.ptt[plan.ptt.length - 1]![1] - plan.ptt[0]![0] : plan.totalMs) / 1000).toFixed(3);
      ctx.io.stderr.write(`keyform: wrote ${o.out} (${format}): ${plan.characterCount} characters, ${seconds} s at ${plan.wpm} wpm${plan.farnsworthWpm ? ` (Farnsworth ${plan.farnsworthWpm})` : ''}\n`);
      if (format === 'wav' || format === 'c') ctx.io.stderr.write(`keyform: ${SAFETY_NOTE}\n`);
      if (o.json) ctx.io.stdout.write(formatJson({ ...planToJson(plan), out: o.out, format }));
    });
}
