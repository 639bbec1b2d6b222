import { Box, Text } from 'ink';
import type { KeyingPlan } from '../../core/timing/plan.js';
import { colorFor, SYMBOLS, type Theme } from '../theme.js';
import { StatusLine } from '../widgets/Frame.js';
import { formatHz } from '../widgets/charts.js';
import { keyingStrip, labelRow, timeRuler } from '../widgets/strip.js';
import { FIELD_LABELS, fieldText, PLAN_FIELDS } from './plan-model.js';
import type { PlanState, Prediction } from './plan-state.js';
import { ExportLine, exportLines } from './ExportPrompt.js';

export { exportLines };

export interface StripLayout {
  msPerColumn: number;
  rows: number;
  width: number;
  /** Milliseconds one page of scrolling moves. */
  pageMs: number;
}

/** Lines above the strip: heading, 7 settings, blank, 2 figures, 2 prediction, blank, strip title. */
const FIXED_LINES = 15;

/** How the timeline strip is laid out for a plan in a screen of the given size (pure). */
export function stripLayout(plan: KeyingPlan | null, zoom: 'detail' | 'whole', width: number, height: number, reserved = 1): StripLayout {
  const w = Math.max(20, width - 2);
  const rows = Math.max(1, Math.min(6, Math.floor((height - FIXED_LINES - reserved) / 3)));
  if (!plan) return { msPerColumn: 10, rows, width: w, pageMs: 10 * w };
  const msPerColumn = zoom === 'detail' ? plan.unitMs / 2 : Math.max(plan.unitMs / 8, plan.totalMs / (w * rows));
  return { msPerColumn, rows, width: w, pageMs: Math.max(msPerColumn, (msPerColumn * w * rows) / 2) };
}

const ms = (x: number): string => (x >= 100 ? x.toFixed(0) : x.toFixed(1));

function predictionText(p: Prediction): { symbol: string; text: string; second: string; tone: 'good' | 'bad' | 'warn' | 'plain' } {
  switch (p.state) {
    case 'idle':
    case 'busy':
      return { symbol: SYMBOLS.busy, text: 'predicting the bandwidth…', second: '', tone: 'plain' };
    case 'unavailable':
      return { symbol: '', text: 'Predicted bandwidth: not available yet (shape analysis not in this build)', second: '', tone: 'plain' };
    case 'error':
      return { symbol: SYMBOLS.warn, text: `predicted bandwidth: ${p.message}`, second: '', tone: 'warn' };
    case 'ready': {
      const parts = [
        p.occupiedHz !== null ? `occupied (99 %) ${formatHz(p.occupiedHz)}` : null,
        p.at40DbcHz !== null ? `at −40 dBc ${formatHz(p.at40DbcHz)}` : null,
      ].filter(Boolean);
      const verdict = p.pass === null ? '' : p.pass ? ` · ${SYMBOLS.pass} within the mask` : ` · ${SYMBOLS.fail} over the mask`;
      const second = p.necessaryHz !== null ? `Necessary bandwidth (ITU-R SM.1138${p.k !== null ? `, K = ${p.k}` : ''}): ${formatHz(p.necessaryHz)}${p.designator ? `, ${p.designator}` : ''}` : '';
      return { symbol: '', text: `Predicted: ${parts.join(' · ')}${verdict}`, second, tone: p.pass === false ? 'bad' : 'plain' };
    }
  }
}

export function PlanScreen(props: { state: PlanState; planned: { plan: KeyingPlan } | { error: string }; width: number; height: number; theme: Theme }) {
  const { state, planned, width, height, theme } = props;
  const plan = 'plan' in planned ? planned.plan : null;
  const layout = stripLayout(plan, state.zoom, width, height, exportLines(state, width));
  const labelWidth = 12;
  const valueWidth = Math.max(10, width - labelWidth - 4);
  const pred = predictionText(state.prediction);
  const strips: { ruler: string; strip: string; labels: string }[] = [];
  if (plan) {
    for (let r = 0; r < layout.rows; r++) {
      const start = state.scrollMs + r * layout.msPerColumn * layout.width;
      if (r > 0 && start > plan.totalMs) break;
      strips.push({
        ruler: timeRuler(start, layout.msPerColumn, layout.width),
        strip: keyingStrip(plan.marks, start, layout.msPerColumn, layout.width),
        labels: labelRow(plan.characters, start, layout.msPerColumn, layout.width),
      });
    }
  }
  const shownEnd = Math.min(plan?.totalMs ?? 0, state.scrollMs + layout.msPerColumn * layout.width * layout.rows);
  return (
    <Box flexDirection="column" width={width}>
      <Text bold> Settings</Text>
      {PLAN_FIELDS.map((f) => {
        const selected = f === state.field;
        const editing = selected && state.editing !== null;
        const value = editing ? `${state.editing}▏` : fieldText(state.settings, f);
        return (
          <Box key={f}>
            <Text color={selected ? colorFor(theme, 'accent') : undefined} bold={selected}>
              {selected ? ` ${SYMBOLS.pointer} ` : '   '}
              {FIELD_LABELS[f].padEnd(labelWidth)}
            </Text>
            <Text wrap="truncate-start" inverse={editing && theme.color} underline={editing && !theme.color}>
              {Array.from(value).length > valueWidth ? Array.from(value).slice(-valueWidth).join('') : value}
            </Text>
            {selected && !editing ? <Text color={colorFor(theme, 'dim')}>{f === 'message' ? '  (Enter to type)' : '  ← →'}</Text> : null}
          </Box>
        );
      })}
      <Text> </Text>
      {plan ? (
        <Box flexDirection="column">
          <Text wrap="truncate">
            {` Duration ${(plan.totalMs / 1000).toFixed(2)} s · unit ${ms(plan.unitMs)} ms · ${plan.characterCount} characters · ${plan.marks.length} marks${plan.farnsworthWpm ? ` · Farnsworth ${plan.farnsworthWpm} wpm overall` : ''}`}
          </Text>
          <Text wrap="truncate">
            {` dit ${ms(plan.ditMs)} ms · dah ${ms(plan.dahMs)} ms · gaps ${ms(plan.gapsMs.element)} / ${ms(plan.gapsMs.letter)} / ${ms(plan.gapsMs.word)} ms (element / letter / word)`}
          </Text>
        </Box>
      ) : (
        <StatusLine tone="bad" symbol={SYMBOLS.fail} text={`cannot plan: ${'error' in planned ? planned.error : ''}`} theme={theme} />
      )}
      <StatusLine tone={pred.tone} symbol={pred.symbol} text={pred.text} theme={theme} />
      <Text wrap="truncate">{` ${pred.second}`}</Text>
      <Text> </Text>
      <Text bold wrap="truncate">
        {` Timeline ${(state.scrollMs / 1000).toFixed(1)}–${(shownEnd / 1000).toFixed(1)} s of ${((plan?.totalMs ?? 0) / 1000).toFixed(1)} s`}
        <Text color={colorFor(theme, 'dim')}>{`  (${state.zoom === 'detail' ? '2 columns per unit' : 'whole message'}; █ key down, · key up)`}</Text>
      </Text>
      {strips.map((s, i) => (
        <Box key={i} flexDirection="column">
          <Text color={colorFor(theme, 'dim')}> {s.ruler}</Text>
          <Text color={colorFor(theme, 'accent')}> {s.strip}</Text>
          <Text> {s.labels}</Text>
        </Box>
      ))}
      <ExportLine state={state} width={width} theme={theme} />
      {plan ? <CharacterTable plan={plan} width={width} rows={height - FIXED_LINES - 3 * strips.length - exportLines(state, width) - 2} /> : null}
    </Box>
  );
}

/** On tall screens: each character with its pattern and start time, in columns. */
function CharacterTable({ plan, width, rows }: { plan: KeyingPlan; width: number; rows: number }) {
  if (rows < 2) return null;
  const cellWidth = 24;
  const columns = Math.max(1, Math.floor((width - 1) / cellWidth));
  const shown = plan.characters.slice(0, rows * columns);
  const lines: string[] = [];
  const used = Math.min(rows, Math.ceil(shown.length / columns));
  for (let r = 0; r < used; r++) {
    let line = '';
    for (let c = 0; c < columns; c++) {
      const ch = shown[c * used + r]; // down each column, then across
      if (!ch) continue;
      line += `${ch.text.padEnd(4)} ${ch.pattern.padEnd(8)} ${(ch.startMs / 1000).toFixed(2).padStart(6)} s`.padEnd(cellWidth);
    }
    lines.push(line);
  }
  return (
    <Box flexDirection="column">
      <Text> </Text>
      <Text bold>{` Characters (pattern, start)${plan.characters.length > shown.length ? ` — first ${shown.length} of ${plan.characters.length}` : ''}`}</Text>
      {lines.map((l, i) => (
        <Text key={i} wrap="truncate">{` ${l}`}</Text>
      ))}
    </Box>
  );
}
