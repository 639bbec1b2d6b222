import React from 'react';
import { Box, Text } from 'ink';
import { colorFor, SYMBOLS, type Theme } from '../theme.js';
import { StatusLine } from '../widgets/Frame.js';
import { progressBar } from '../widgets/charts.js';
import type { ShapeState } from './shape-state.js';
import { shapeSummary, spectrumLines, sweepLines } from './shape-view.js';

const CAUTION = 'keyform measures, it does not certify: defer to your local regulations and licensed practice.';

export function ShapeScreen({ state, recording, width, height, theme }: { state: ShapeState; recording: string | null; width: number; height: number; theme: Theme }) {
  const inner = width - 2;
  const body: React.ReactNode[] = [];
  const add = (n: React.ReactNode): void => {
    body.push(<React.Fragment key={body.length}>{n}</React.Fragment>);
  };
  add(
    <Text wrap="truncate">
      <Text bold>{' Source: '}</Text>
      {state.label ? `${state.label} (${state.source === 'recording' ? 'measured' : 'predicted'})` : 'nothing yet'}
      {!state.label ? <Text color={colorFor(theme, 'dim')}>{`  · Enter measures ${recording ?? '(choose a recording in Read back)'}`}</Text> : null}
    </Text>,
  );
  if (state.job) {
    add(<Text color={colorFor(theme, 'accent')}>{` ${state.job.what === 'measure' ? 'Measuring' : state.job.what === 'predict' ? 'Predicting' : 'Sweeping'} ${progressBar(state.job.progress, Math.min(50, inner))}`}</Text>);
  }
  if (state.error) {
    add(
      state.error.unavailable ? (
        <Text wrap="wrap">{` Not available yet: ${state.error.message}. The Plan workspace (1) works.`}</Text>
      ) : (
        <StatusLine tone="bad" symbol={SYMBOLS.fail} text={state.error.message} theme={theme} />
      ),
    );
  }
  const scrollable: React.ReactNode[] = [];
  if (state.report) {
    const sum = shapeSummary(state.report);
    for (const l of sum.lines) scrollable.push(<Text wrap="truncate">{` ${l}`}</Text>);
    scrollable.push(
      <StatusLine
        tone={sum.verdict.pass === null ? 'plain' : sum.verdict.pass ? 'good' : 'bad'}
        symbol={sum.verdict.pass === null ? '' : sum.verdict.pass ? SYMBOLS.pass : SYMBOLS.fail}
        text={sum.verdict.text}
        theme={theme}
      />,
    );
    const plotRows = Math.max(5, Math.min(20, height - 16));
    const plot = spectrumLines(state.report, inner, plotRows);
    if (plot) {
      scrollable.push(<Text bold wrap="truncate">{` ${plot.title}`}</Text>);
      for (const l of plot.lines) scrollable.push(<Text color={colorFor(theme, 'accent')}>{` ${l}`}</Text>);
    }
    const warnings = Array.isArray(state.report.warnings) ? (state.report.warnings as string[]) : [];
    for (const w of warnings) scrollable.push(<StatusLine tone="warn" symbol={SYMBOLS.warn} text={w} theme={theme} />);
  } else if (!state.job && !state.error) {
    scrollable.push(<Text wrap="wrap"> Press Enter to measure the keying shape of the recording chosen in Read back, p to predict it from the Plan settings, or w for a rise-time sweep.</Text>);
  }
  const sweep = sweepLines(state.sweep);
  if (sweep.length > 0) {
    const sw = state.sweep as { wpm?: number; edge?: string };
    scrollable.push(<Text bold>{` Rise-time sweep at ${sw.wpm ?? ''} wpm, ${sw.edge ?? ''} edges (from the Plan settings)`}</Text>);
    for (const l of sweep) scrollable.push(<Text wrap="truncate">{`   ${l}`}</Text>);
  }
  const room = Math.max(3, height - body.length - 1);
  const first = Math.min(state.scroll, Math.max(0, scrollable.length - room));
  return (
    <Box flexDirection="column" width={width} height={height}>
      {body}
      {scrollable.slice(first, first + room).map((n, i) => (
        <React.Fragment key={first + i}>{n}</React.Fragment>
      ))}
      <Box flexGrow={1} />
      <Text color={colorFor(theme, 'dim')} wrap="truncate">{` ${CAUTION}`}</Text>
    </Box>
  );
}
