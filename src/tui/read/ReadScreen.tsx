import React from 'react';
import { basename } from 'node:path';
import { Box, Text } from 'ink';
import { colorFor, SYMBOLS, type Theme } from '../theme.js';
import { StatusLine } from '../widgets/Frame.js';
import { envelopeChart, progressBar } from '../widgets/charts.js';
import { labelRow } from '../widgets/strip.js';
import type { ReadState } from './read-state.js';
import { comparisonLines, DOUBTFUL_BELOW, markedTextLines, timingLines } from './read-view.js';

const kib = (n: number): string => `${Math.max(1, Math.round(n / 1024))} KiB`;

function FileList({ state, width, height, theme }: { state: ReadState; width: number; height: number; theme: Theme }) {
  const files = state.list?.files ?? [];
  const rows = Math.max(3, height - 3);
  const first = Math.max(0, Math.min(state.cursor - Math.floor(rows / 2), files.length - rows));
  const openPath = state.result?.path ?? state.decoding?.path;
  return (
    <Box flexDirection="column" width={width}>
      <Text bold wrap="truncate"> Recordings</Text>
      <Text color={colorFor(theme, 'dim')} wrap="truncate-start">{` ${state.list?.dir ?? '…'}`}</Text>
      {state.listError ? <StatusLine tone="bad" symbol={SYMBOLS.fail} text={state.listError} theme={theme} /> : null}
      {state.list && files.length === 0 ? <Text wrap="wrap"> no .wav files here</Text> : null}
      {files.slice(first, first + rows).map((f, i) => {
        const selected = first + i === state.cursor;
        const open = f.path === openPath;
        return (
          <Text key={f.path} wrap="truncate" bold={selected} color={selected ? colorFor(theme, 'accent') : undefined}>
            {selected ? `${SYMBOLS.pointer}` : ' '}
            {open ? '•' : ' '}
            {f.name}
            {width >= 34 ? <Text color={colorFor(theme, 'dim')}>{` ${kib(f.sizeBytes)}`}</Text> : null}
          </Text>
        );
      })}
    </Box>
  );
}

/** Envelope window for a decode in a pane `inner` columns wide (pure; also gives the App its page size). */
export function envelopeWindow(state: ReadState, inner: number): { startMs: number; msPerColumn: number; pageMs: number } | null {
  const d = state.result?.decode;
  if (!d || d.durationMs <= 0) return null;
  const whole = d.durationMs / inner;
  const msPerColumn = state.zoom === 'whole' || !(d.unitMs > 0) ? whole : Math.min(whole, d.unitMs / 2);
  return { startMs: state.envelopeMs, msPerColumn, pageMs: (msPerColumn * inner) / 2 };
}

/** Width of the right-hand pane of Read back. */
export function readInnerWidth(width: number): number {
  return Math.max(20, width - readListWidth(width) - 1) - 2;
}

/** Width of the recordings list: room for the demo names, their sizes on wide screens. */
export function readListWidth(width: number): number {
  return width >= 120 ? 36 : 25;
}

export function ReadScreen({ state, width, height, theme }: { state: ReadState; width: number; height: number; theme: Theme }) {
  const listWidth = readListWidth(width);
  const rightWidth = Math.max(20, width - listWidth - 1);
  const inner = readInnerWidth(width);
  const r = state.result;
  const d = r?.decode;
  const lines: React.ReactNode[] = [];
  let used = 0;
  const push = (node: React.ReactNode, n = 1): void => {
    lines.push(<React.Fragment key={lines.length}>{node}</React.Fragment>);
    used += n;
  };

  if (state.decoding) {
    push(<Text wrap="truncate">{` Decoding ${basename(state.decoding.path)}`}</Text>);
    push(<Text color={colorFor(theme, 'accent')}>{` ${progressBar(state.decoding.progress, Math.min(50, inner))}`}</Text>);
  } else if (state.error) {
    push(
      state.error.unavailable ? (
        <Text wrap="wrap">{` Reading back is not available yet: ${state.error.message}. The Plan workspace (1) works.`}</Text>
      ) : (
        <StatusLine tone="bad" symbol={SYMBOLS.fail} text={state.error.message} theme={theme} />
      ),
      2,
    );
  } else if (!r) {
    push(<Text wrap="wrap"> Choose a recording on the left and press Enter to decode it.</Text>, 2);
  }

  if (r && d) {
    const doubtful = d.characters.filter((c) => c.confidence < DOUBTFUL_BELOW).length;
    push(
      <Text bold wrap="truncate">
        {` ${basename(r.path)}`}
        <Text color={colorFor(theme, 'dim')}>{` · ${(d.durationMs / 1000).toFixed(1)} s${r.channelNote ? ` · ${r.channelNote}` : ''}`}</Text>
      </Text>,
    );
    const textRows = markedTextLines(d.text === '' ? '(nothing decoded)' : d.text, d.characters, inner).slice(0, Math.max(1, Math.floor((height - 14) / 2)));
    for (const row of textRows) {
      push(<Text bold>{` ${row.text}`}</Text>);
      if (row.marks.trim() !== '') push(<Text color={colorFor(theme, 'warn')}>{` ${row.marks}`}</Text>);
    }
    push(
      <Text wrap="truncate">
        {` ${d.wpm > 0 ? d.wpm.toFixed(1) : '–'} wpm · tone ${d.toneHz !== null ? `${Math.round(d.toneHz)} Hz` : '–'} · SNR ${d.snrDb !== null ? `${d.snrDb.toFixed(1)} dB` : '–'} (2500 Hz)`}
      </Text>,
    );
    push(
      <Text wrap="truncate">
        {` ${d.characters.length} characters`}
        {doubtful > 0 ? <Text color={colorFor(theme, 'warn')}>{` · ${doubtful} doubtful (? under it)`}</Text> : null}
      </Text>,
    );
    for (const w of d.warnings.slice(0, 2)) push(<StatusLine tone="warn" symbol={SYMBOLS.warn} text={w} theme={theme} />);
    const win = envelopeWindow(state, inner);
    if (d.envelope && d.envelope.values.length > 0 && win) {
      const chartRows = Math.max(2, Math.min(10, height - used - 13));
      const frameMs = d.envelope.frameMs;
      const endMs = Math.min(d.durationMs, win.startMs + win.msPerColumn * inner);
      const i0 = Math.floor(win.startMs / frameMs);
      const i1 = Math.min(d.envelope.values.length, Math.ceil(endMs / frameMs));
      const cols = Math.max(1, Math.min(inner, Math.round((endMs - win.startMs) / win.msPerColumn)));
      push(
        <Text color={colorFor(theme, 'dim')} wrap="truncate">
          {` Envelope ${(win.startMs / 1000).toFixed(1)}–${(endMs / 1000).toFixed(1)} s of ${(d.durationMs / 1000).toFixed(1)} s · ─ threshold · ← → z`}
        </Text>,
      );
      for (const line of envelopeChart(d.envelope.values, d.envelope.threshold, cols, chartRows, i0, i1)) push(<Text color={colorFor(theme, 'accent')}>{` ${line}`}</Text>);
      push(<Text wrap="truncate">{` ${labelRow(d.characters, win.startMs, win.msPerColumn, cols)}`}</Text>);
    }
  }

  // Lower pane.
  const paneRows = Math.max(2, height - used - 2);
  let pane: { title: string; lines: string[]; verdict?: { text: string; pass: boolean | null } } | null = null;
  if (state.typing !== null) {
    pane = { title: 'Expected message, planned at the Plan speed (Enter compares, Esc drops)', lines: [`${state.typing}▏`] };
  } else if (state.pane === 'compare') {
    const c = state.comparison;
    if (!state.expected) pane = { title: 'Comparison', lines: ['press e and type the message that was meant to be sent'] };
    else if (!c) pane = { title: `Comparison with "${state.expected}"`, lines: ['decode a recording to compare it'] };
    else if (c.state === 'busy') pane = { title: `Comparison with "${state.expected}"`, lines: [`${SYMBOLS.busy} aligning`] };
    else if (c.state === 'error') pane = { title: `Comparison with "${state.expected}"`, lines: [c.unavailable ? `not available yet: ${c.message}` : `${SYMBOLS.fail} ${c.message}`] };
    else {
      const cl = comparisonLines(c.report);
      pane = { title: `Comparison with "${state.expected}" at ${c.atWpm} wpm`, lines: cl.lines, verdict: { text: cl.verdict, pass: cl.pass } };
    }
  } else if (r) {
    pane = r.timing
      ? { title: 'Timing of what was heard', lines: timingLines(r.timing, inner - 2, height >= 30 ? 3 : 2) }
      : { title: 'Timing of what was heard', lines: [r.timingNote ?? 'no timing report'] };
  }

  return (
    <Box width={width} height={height}>
      <FileList state={state} width={listWidth} height={height} theme={theme} />
      <Box flexDirection="column" width={rightWidth} marginLeft={1}>
        {lines}
        {pane ? (
          <Box flexDirection="column">
            <Text bold wrap="truncate">{` ${pane.title}`}<Text color={colorFor(theme, 'dim')}>{`  (v ${state.pane === 'timing' ? 'comparison' : 'timing'})`}</Text></Text>
            {pane.verdict ? (
              <StatusLine
                tone={pane.verdict.pass === null ? 'plain' : pane.verdict.pass ? 'good' : 'bad'}
                symbol={pane.verdict.pass === null ? '' : pane.verdict.pass ? SYMBOLS.pass : SYMBOLS.fail}
                text={pane.verdict.text}
                theme={theme}
              />
            ) : null}
            {pane.lines.slice(Math.min(state.scroll, Math.max(0, pane.lines.length - 1)), Math.min(state.scroll, Math.max(0, pane.lines.length - 1)) + paneRows - (pane.verdict ? 1 : 0)).map((l, i) => (
              <Text key={i} wrap="truncate">{` ${l}`}</Text>
            ))}
          </Box>
        ) : null}
      </Box>
    </Box>
  );
}
