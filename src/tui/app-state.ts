import type { KeyHelp, KeyInfo } from './keys.js';

export type Workspace = 'plan' | 'read' | 'shape';
export const WORKSPACES: readonly Workspace[] = ['plan', 'read', 'shape'];
export const WORKSPACE_NAMES: Record<Workspace, string> = { plan: 'Plan', read: 'Read back', shape: 'Shape' };

export interface FrameState {
  workspace: Workspace;
  help: boolean;
  quitting: boolean;
}

export const initialFrame = (workspace: Workspace = 'plan'): FrameState => ({ workspace, help: false, quitting: false });

export type FrameAction =
  | { type: 'switch'; to: Workspace }
  | { type: 'cycle'; delta: 1 | -1 }
  | { type: 'help' }
  | { type: 'close-help' }
  | { type: 'quit' };

export function frameReducer(state: FrameState, action: FrameAction): FrameState {
  switch (action.type) {
    case 'switch':
      return { ...state, workspace: action.to, help: false };
    case 'cycle': {
      const i = WORKSPACES.indexOf(state.workspace);
      return { ...state, workspace: WORKSPACES[(i + action.delta + WORKSPACES.length) % WORKSPACES.length]!, help: false };
    }
    case 'help':
      return { ...state, help: !state.help };
    case 'close-help':
      return { ...state, help: false };
    case 'quit':
      return { ...state, quitting: true };
  }
}

/**
 * The keys that work everywhere. `captured` is true while a workspace takes every key (typing),
 * when only Ctrl-C still leaves. Returns null for keys the workspace should get.
 */
export function frameKeyToAction(input: string, k: KeyInfo, state: FrameState, captured: boolean): FrameAction | null {
  if (k.ctrl && input === 'c') return { type: 'quit' };
  if (state.help) {
    if (input === 'q') return { type: 'quit' };
    return { type: 'close-help' }; // any other key closes the help
  }
  if (captured) return null;
  if (input === 'q') return { type: 'quit' };
  if (input === '?' || input === 'h') return { type: 'help' };
  if (input === '1') return { type: 'switch', to: 'plan' };
  if (input === '2') return { type: 'switch', to: 'read' };
  if (input === '3') return { type: 'switch', to: 'shape' };
  if (k.tab) return { type: 'cycle', delta: k.shift ? -1 : 1 };
  return null;
}

export const FRAME_KEYS: readonly KeyHelp[] = [
  { keys: '1 2 3  Tab', does: 'Plan · Read back · Shape; Tab (Shift-Tab) next (previous)' },
  { keys: '?  (h)', does: 'this help (any key closes it)' },
  { keys: 'q  Ctrl-C', does: 'leave keyform (Ctrl-C also while typing)' },
];
