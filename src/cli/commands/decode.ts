import { Option, type Command } from 'commander';
import { InputError } from '../../core/errors.js';
import type { DecodeResult } from '../../core/receive/index.js';
import { openAudio } from '../../io/audio-source.js';
import { RAW_ENCODINGS, type RawEncoding } from '../../io/wav-stream.js';
import { decodeAudioSource, followText } from '../analyze-recording.js';
import { createProgress } from '../progress.js';
import { formatJson } from '../../io/json.js';
import type { CommandContext } from '../io.js';
import { numberIn, oneOf } from '../options.js';

export interface DecodeCliOptions {
  tone?: number;
  channel?: number;
  json?: boolean;
  raw?: RawEncoding;
  rate?: number;
  channels?: number;
}

const r1 = (x: number): number => Math.round(x * 10) / 10;

/** The JSON form of a decode (field names are a stable interface, shared with the encoder's timeline). */
export function decodeToJson(result: DecodeResult, extra: Record<string, unknown>): Record<string, unknown> {
  return {
    text: result.text,
    wpm: result.wpm,
    farnsworthWpm: result.farnsworthWpm,
    unitMs: result.unitMs,
    toneHz: result.toneHz,
    snrDb: result.snrDb,
    totalMs: result.totalMs,
    durationMs: result.durationMs,
    ...extra,
    marks: result.marks.map(([a, b]) => [r1(a), r1(b)]),
    characters: result.characters.map((c) => ({
      text: c.text,
      startMs: r1(c.startMs),
      endMs: r1(c.endMs),
      pattern: c.pattern,
      confidence: Math.round(c.confidence * 1000) / 1000,
    })),
    warnings: result.warnings,
  };
}

/** One-line summary for stderr. */
export function decodeSummary(result: DecodeResult): string {
  if (result.toneHz === null) return 'no keyed signal found';
  const parts = [`${result.wpm} wpm`];
  if (result.farnsworthWpm !== null) parts.push(`Farnsworth ${result.farnsworthWpm} wpm`);
  parts.push(`tone ${result.toneHz.toFixed(1)} Hz`);
  parts.push(result.snrDb === null ? 'SNR not measurable (no noise)' : `SNR ${result.snrDb.toFixed(1)} dB in 2500 Hz`);
  parts.push(`${result.characters.length} characters`);
  return parts.join(', ');
}

export function registerDecode(program: Command, ctx: CommandContext): void {
  program
    .command('decode')
    .argument('<file>', 'WAV recording (PCM 8/16/24/32-bit or 32-bit float, any channels, 8000–192000 Hz), or - for stdin')
    .summary('read a recording of a keyed tone back to text, speed and timeline')
    .description(
      'Decode the keyed tone in a WAV recording: text on stdout, a one-line summary (speed, tone, SNR) on stderr. ' +
        'The tone is found automatically (strongest spectral peak) and trimmed as decoding goes; the speed is ' +
        'estimated and tracked. SNR is key-down carrier power over noise power in a 2500 Hz bandwidth.',
    )
    .option('--tone <hz>', 'carrier tone in the recording (Hz, 50–20000; default: found automatically)', numberIn('--tone', 50, 20_000))
    .option('--channel <n>', 'channel to decode, 1 = first (default: the one with the strongest keyed tone)', numberIn('--channel', 1, 64, { integer: true }))
    .option('--json', 'print { text, wpm, toneHz, snrDb, marks, characters, warnings, … } as JSON on stdout')
    .addOption(new Option('--raw <encoding>', 'headerless PCM input: s16le or f32le, interleaved (needs --rate)').argParser(oneOf('--raw', RAW_ENCODINGS)))
    .option('--rate <hz>', 'raw PCM sample rate (Hz, 8000–192000)', numberIn('--rate', 8000, 192_000, { integer: true }))
    .option('--channels <n>', 'raw PCM channels (1–256; default 1)', numberIn('--channels', 1, 256, { integer: true }))
    .addHelpText(
      'after',
      `
Examples:
  keyform decode q7zkt-beacon.wav
  keyform decode shack-recording.wav --tone 650 --channel 2
  keyform decode q7zkt-beacon.wav --json > observed.json

Marks are [startMs, endMs] from the start of the audio; characters carry their dots and dashes
and a confidence 0…1. Unknown patterns print as *. Silence or noise is not an error: the text is
empty and a warning says no keyed signal was found.`,
    )
    .action(async (file: string, o: DecodeCliOptions) => {
      const audio = await openAudio(file, { raw: o.raw, rate: o.rate, channels: o.channels, stdin: ctx.io.stdin, reuseChunks: true });
      if (o.channel !== undefined && o.channel > audio.channelCount) {
        const n = audio.channelCount;
        throw new InputError(`${audio.name}: --channel ${o.channel} does not exist (the ${file === '-' ? 'input' : 'file'} has ${n} channel${n === 1 ? '' : 's'})`);
      }
      if (o.tone !== undefined && o.tone >= audio.sampleRate / 2) {
        throw new InputError(`--tone must be below half the sample rate, ${audio.sampleRate / 2} Hz (got ${o.tone})`);
      }
      // stdin: text as it is decoded (a character at a time, lines broken at word gaps); files: at the end.
      const live = file === '-' && !o.json ? followText((s) => ctx.io.stdout.write(s)) : null;
      const bar = createProgress(ctx.io, { label: audio.name, audioSeconds: audio.durationMs === null ? null : audio.durationMs / 1000 });
      const { result, channel, channelNote } = await decodeAudioSource(audio, {
        toneHz: o.tone,
        channel: o.channel === undefined ? undefined : o.channel - 1,
        onText: live?.write,
        onProgress: o.json ? undefined : (f) => bar.update(f),
      });
      bar.done();
      live?.end();
      for (const w of audio.warnings) ctx.warn(w);
      if (channelNote) ctx.warn(channelNote);
      for (const w of result.warnings) ctx.warn(w);
      if (o.json) {
        ctx.io.stdout.write(
          formatJson(
            decodeToJson(result, {
              sampleRate: audio.sampleRate,
              encoding: audio.encoding,
              channel: channel + 1,
              channels: audio.channelCount,
            }),
          ),
        );
      } else if (!live) {
        ctx.io.stdout.write(result.text + '\n');
      }
      ctx.warn(decodeSummary(result));
    });
}
