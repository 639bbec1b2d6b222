import { Box, Text } from 'ink';
import { SAFETY_NOTE } from '../../io/export.js';
import { colorFor, SYMBOLS, type Theme } from '../theme.js';
import { StatusLine } from '../widgets/Frame.js';
import { progressBar } from '../widgets/charts.js';
import type { PlanState } from './plan-state.js';

/** The export caution: the full note on wide screens, a short one that keeps every point on narrow ones. */
export function exportCaution(width: number): string {
  const short =
    'Caution: transmitting needs a licence and follows local rules; mind RF exposure; keying lines can carry voltage, so isolate them; defer to licensed practice.';
  return width >= SAFETY_NOTE.length + 2 ? SAFETY_NOTE : short;
}

/** Lines the export prompt or status takes below the strip at this width. */
export function exportLines(state: PlanState, width: number): number {
  const ex = state.exporter;
  if (!ex) return state.status ? 1 : 0;
  const caution = ex.format === 'wav' || ex.format === 'c' ? Math.ceil((exportCaution(width).length + 1) / Math.max(20, width - 1)) : 0;
  return 1 + (ex.stage === 'confirm' ? 1 : 0) + caution;
}

/** The export prompt (format, file name, replace question, caution) or the last status line. */
export function ExportLine({ state, width, theme }: { state: PlanState; width: number; theme: Theme }) {
  const ex = state.exporter;
  if (ex) {
    const caution = ex.format === 'wav' || ex.format === 'c';
    return (
      <Box flexDirection="column">
        <Text wrap="truncate">
          {' Export as '}
          <Text bold>{ex.format}</Text>
          {' to '}
          <Text inverse={theme.color} underline={!theme.color}>{`${ex.fileName}▏`}</Text>
          {ex.stage === 'writing' ? ` ${progressBar(0.5, 12)}` : ''}
        </Text>
        {ex.stage === 'confirm' ? (
          <StatusLine tone="warn" symbol={SYMBOLS.warn} text={`${ex.fileName} already exists: y replaces it, n keeps it`} theme={theme} />
        ) : null}
        {caution ? (
          <Box paddingLeft={1}>
            <Text color={colorFor(theme, 'dim')} wrap="wrap">{exportCaution(width)}</Text>
          </Box>
        ) : null}
      </Box>
    );
  }
  if (state.status) {
    const symbol = state.status.tone === 'good' ? SYMBOLS.pass : state.status.tone === 'bad' ? SYMBOLS.fail : '';
    return <StatusLine tone={state.status.tone === 'accent' || state.status.tone === 'dim' ? 'plain' : state.status.tone} symbol={symbol} text={state.status.text} theme={theme} />;
  }
  return null;
}
