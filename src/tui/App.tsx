import { useEffect, useMemo, useReducer, useState } from 'react';
import { basename } from 'node:path';
import { Box, useApp, useInput, useStdout } from 'ink';
import { FRAME_KEYS, type Workspace } from './app-state.js';
import { appReducer, initialAppState, shapeRecording, type AppState } from './app-model.js';
import type { KeyInfo } from './keys.js';
import type { Services } from './services.js';
import type { Theme } from './theme.js';
import { useAppEffects } from './use-effects.js';
import { Footer, Header, HelpOverlay } from './widgets/Frame.js';
import { computePlan } from './plan/plan-model.js';
import { exportLines, PlanScreen, stripLayout } from './plan/PlanScreen.js';
import { PLAN_KEYS, planFooter } from './plan/plan-state.js';
import { envelopeWindow, ReadScreen, readInnerWidth } from './read/ReadScreen.js';
import { READ_KEYS, readFooter } from './read/read-state.js';
import { ShapeScreen } from './shape/ShapeScreen.js';
import { SHAPE_KEYS, shapeFooter } from './shape/shape-state.js';

export interface AppProps {
  services: Services;
  theme: Theme;
  /** A recording or folder to open in Read back. */
  target?: string;
  /** Workspace shown first. */
  start?: Workspace;
  /** Fixed size (tests); otherwise the terminal's, following resizes. */
  size?: { columns: number; rows: number };
}

function useTerminalSize(fixed?: { columns: number; rows: number }): { columns: number; rows: number } {
  const { stdout } = useStdout();
  const read = (): { columns: number; rows: number } => fixed ?? { columns: stdout.columns || 80, rows: stdout.rows || 24 };
  const [size, setSize] = useState(read);
  useEffect(() => {
    if (fixed) return;
    const onResize = (): void => setSize(read());
    stdout.on('resize', onResize);
    return () => {
      stdout.off('resize', onResize);
    };
  });
  return size;
}

/** The whole app: header, the open workspace, footer; one keyboard handler feeds the reducer. */
export function App({ services, theme, target, start, size: fixed }: AppProps) {
  const { exit } = useApp();
  const size = useTerminalSize(fixed);
  const width = Math.max(40, size.columns);
  const height = Math.max(12, size.rows);
  const bodyHeight = height - 2;
  const [state, dispatch] = useReducer(appReducer, start ?? (target ? 'read' : 'plan'), initialAppState);
  const frame = state.frame;
  useAppEffects(state, dispatch, services, target);
  const planned = useMemo(() => computePlan(state.plan.settings), [state.plan.settings]);

  useEffect(() => {
    if (frame.quitting) exit();
  }, [frame.quitting, exit]);

  // How far one page of scrolling moves in the open workspace (depends on the screen size).
  const pageMs =
    frame.workspace === 'read'
      ? (envelopeWindow(state.read, readInnerWidth(width))?.pageMs ?? 1000)
      : stripLayout('plan' in planned ? planned.plan : null, state.plan.zoom, width, bodyHeight, exportLines(state.plan, width)).pageMs;
  useInput((input: string, key: KeyInfo) => dispatch({ type: 'key', input, key, pageMs }));

  if (frame.help) {
    return (
      <HelpOverlay
        width={width}
        theme={theme}
        groups={[
          { title: 'Everywhere', keys: FRAME_KEYS },
          { title: 'Plan — the keying of a message', keys: PLAN_KEYS },
          { title: 'Read back — decode a recording', keys: READ_KEYS },
          { title: 'Shape — rise, fall, clicks and bandwidth', keys: SHAPE_KEYS },
        ]}
      />
    );
  }

  const hint = frame.workspace === 'plan' ? planFooter(state.plan) : frame.workspace === 'read' ? readFooter(state.read) : shapeFooter();
  const rec = shapeRecording(state);
  return (
    <Box flexDirection="column" width={width} height={height}>
      <Header workspace={frame.workspace} width={width} theme={theme} activity={backgroundActivity(state)} />
      <Box height={bodyHeight} flexDirection="column" overflow="hidden">
        {frame.workspace === 'plan' ? (
          <PlanScreen state={state.plan} planned={planned} width={width} height={bodyHeight} theme={theme} />
        ) : frame.workspace === 'read' ? (
          <ReadScreen state={state.read} width={width} height={bodyHeight} theme={theme} />
        ) : (
          <ShapeScreen state={state.shape} recording={rec ? basename(rec) : null} width={width} height={bodyHeight} theme={theme} />
        )}
      </Box>
      <Footer hint={hint} width={width} theme={theme} />
    </Box>
  );
}

/** A slow job running in a workspace that is not open, e.g. `… decoding 40 %`, for the header. */
export function backgroundActivity(state: AppState): string | null {
  const pct = (f: number): string => `${Math.round(f * 100)} %`;
  if (state.read.decoding && state.frame.workspace !== 'read') return `… decoding ${pct(state.read.decoding.progress)}`;
  const job = state.shape.job;
  if (job && state.frame.workspace !== 'shape') return `… ${job.what === 'measure' ? 'measuring' : job.what === 'predict' ? 'predicting' : 'sweeping'} ${pct(job.progress)}`;
  return null;
}
