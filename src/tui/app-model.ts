/**
 * The whole app's state as one pure reducer: every key press is mapped against the current state
 * (never a stale copy), so fast typing and pasting reach the right place. Side effects are started
 * by the hooks in use-effects.ts when the state asks for them.
 */
import { basename } from 'node:path';
import { frameKeyToAction, frameReducer, initialFrame, type FrameAction, type FrameState, type Workspace } from './app-state.js';
import type { KeyInfo } from './keys.js';
import { initialPlanState, planCapturesInput, planKeyToAction, planReducer, type PlanAction, type PlanState } from './plan/plan-state.js';
import { initialReadState, readCapturesInput, readKeyToAction, readReducer, selectedPath, type ReadAction, type ReadState } from './read/read-state.js';
import { initialShapeState, shapeKeyToAction, shapeReducer, type ShapeAction, type ShapeState } from './shape/shape-state.js';
import type { ShapeTask } from './tasks.js';

export interface AppState {
  frame: FrameState;
  plan: PlanState;
  read: ReadState;
  shape: ShapeState;
}

export const initialAppState = (start: Workspace = 'plan'): AppState => ({
  frame: initialFrame(start),
  plan: initialPlanState(),
  read: initialReadState(),
  shape: initialShapeState(),
});

export type AppAction =
  | { type: 'key'; input: string; key: KeyInfo; pageMs: number }
  | { type: 'frame'; action: FrameAction }
  | { type: 'plan'; action: PlanAction }
  | { type: 'read'; action: ReadAction }
  | { type: 'shape'; action: ShapeAction };

/** The recording the Shape workspace measures: the one decoded in Read back, else the one chosen there. */
export function shapeRecording(state: AppState): string | null {
  return state.read.result?.path ?? selectedPath(state.read);
}

export function capturesInput(state: AppState): boolean {
  return (state.frame.workspace === 'plan' && planCapturesInput(state.plan)) || (state.frame.workspace === 'read' && readCapturesInput(state.read));
}

function shapeStart(state: AppState, what: 'measure' | 'predict' | 'sweep'): ShapeAction {
  const s = state.plan.settings;
  if (what === 'measure') {
    const path = shapeRecording(state);
    if (!path) return { type: 'failed', message: 'no recording chosen: pick one in Read back (2) first', unavailable: false };
    const task: ShapeTask = { kind: 'measure', path };
    return { type: 'start', what, label: basename(path), task };
  }
  if (what === 'predict') {
    const task: ShapeTask = { kind: 'predict', wpm: s.wpm, farnsworthWpm: s.farnsworthWpm, riseMs: s.riseMs, edge: s.edge, message: s.message };
    return { type: 'start', what, label: `plan: ${s.wpm} wpm, ${s.edge}${s.edge === 'hard' ? '' : ` ${s.riseMs} ms`}`, task };
  }
  const task: ShapeTask = { kind: 'sweep', wpm: s.wpm, farnsworthWpm: s.farnsworthWpm, edge: s.edge, message: s.message };
  return { type: 'start', what, label: `sweep at ${s.wpm} wpm, ${s.edge}`, task };
}

export function appReducer(state: AppState, action: AppAction): AppState {
  switch (action.type) {
    case 'frame':
      return { ...state, frame: frameReducer(state.frame, action.action) };
    case 'plan':
      return { ...state, plan: planReducer(state.plan, action.action) };
    case 'read':
      return { ...state, read: readReducer(state.read, action.action) };
    case 'shape':
      return { ...state, shape: shapeReducer(state.shape, action.action) };
    case 'key': {
      const { input, key, pageMs } = action;
      const global = frameKeyToAction(input, key, state.frame, capturesInput(state));
      if (global) return appReducer(state, { type: 'frame', action: global });
      switch (state.frame.workspace) {
        case 'plan': {
          const a = planKeyToAction(input, key, state.plan, pageMs);
          return a ? appReducer(state, { type: 'plan', action: a }) : state;
        }
        case 'read': {
          const a = readKeyToAction(input, key, state.read, pageMs);
          if (a?.type === 'expect-start') return appReducer(state, { type: 'read', action: { ...a, prefill: state.plan.settings.message } });
          return a ? appReducer(state, { type: 'read', action: a }) : state;
        }
        case 'shape': {
          const req = shapeKeyToAction(input, key);
          if (!req) return state;
          const a: ShapeAction = req.type === 'scroll' ? { type: 'scroll', delta: req.delta } : shapeStart(state, req.type);
          return appReducer(state, { type: 'shape', action: a });
        }
      }
    }
  }
}
