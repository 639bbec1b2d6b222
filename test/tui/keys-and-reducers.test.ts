import { describe, expect, it } from 'vitest';
import { frameKeyToAction, frameReducer, initialFrame } from '../../src/tui/app-state.js';
import { appReducer, initialAppState, type AppState } from '../../src/tui/app-model.js';
import { key } from '../../src/tui/keys.js';
import { applyTyped, computePlan, DEFAULT_SETTINGS, stepField } from '../../src/tui/plan/plan-model.js';
import { initialPlanState, planKeyToAction, planReducer, suggestedName } from '../../src/tui/plan/plan-state.js';
import { initialReadState, readKeyToAction, readReducer } from '../../src/tui/read/read-state.js';
import { editText } from '../../src/tui/widgets/text-edit.js';
import { colorAllowed } from '../../src/tui/theme.js';

/** Feeds key presses through the whole app's reducer, as the keyboard would. */
function press(state: AppState, ...keys: (string | { input?: string; k: Parameters<typeof key>[0] })[]): AppState {
  for (const p of keys) {
    const { input, k } = typeof p === 'string' ? { input: p, k: {} } : { input: p.input ?? '', k: p.k };
    state = appReducer(state, { type: 'key', input, key: key(k), pageMs: 1000 });
  }
  return state;
}

describe('frame key map', () => {
  it('switches workspaces with 1 2 3 and Tab, opens help with ?', () => {
    const s = initialFrame();
    expect(frameKeyToAction('2', key(), s, false)).toEqual({ type: 'switch', to: 'read' });
    expect(frameKeyToAction('3', key(), s, false)).toEqual({ type: 'switch', to: 'shape' });
    expect(frameReducer(s, { type: 'cycle', delta: -1 }).workspace).toBe('shape');
    expect(frameKeyToAction('?', key(), s, false)).toEqual({ type: 'help' });
  });

  it('leaves with q, and with Ctrl-C even while typing', () => {
    const s = initialFrame();
    expect(frameKeyToAction('q', key(), s, false)).toEqual({ type: 'quit' });
    expect(frameKeyToAction('q', key(), s, true)).toBeNull(); // q is a letter while typing
    expect(frameKeyToAction('c', key({ ctrl: true }), s, true)).toEqual({ type: 'quit' });
  });

  it('closes the help on any key', () => {
    const s = { ...initialFrame(), help: true };
    expect(frameKeyToAction('x', key(), s, false)).toEqual({ type: 'close-help' });
    expect(frameKeyToAction('q', key(), s, false)).toEqual({ type: 'quit' });
  });
});

describe('colour', () => {
  it('is used only on a terminal and never with NO_COLOR set (any value, https://no-color.org)', () => {
    expect(colorAllowed({}, true)).toBe(true);
    expect(colorAllowed({ NO_COLOR: '' }, true)).toBe(false);
    expect(colorAllowed({ NO_COLOR: '1' }, true)).toBe(false);
    expect(colorAllowed({}, false)).toBe(false);
  });
});

describe('text field', () => {
  it('types, pastes, deletes and clears', () => {
    expect(editText('Q7', 'Z', key())).toBe('Q7Z');
    expect(editText('Q7', 'ZKT TEST', key())).toBe('Q7ZKT TEST');
    expect(editText('Q7Z', '', key({ backspace: true }))).toBe('Q7');
    expect(editText('Q7Z', 'u', key({ ctrl: true }))).toBe('');
    expect(editText('Q7Z', '', key({ return: true }))).toBeNull();
  });
});

describe('Plan workspace model', () => {
  it('edits the message through the key map, even when keys come faster than renders', () => {
    const s = press(initialAppState(), { k: { return: true } }, { input: 'u', k: { ctrl: true } }, 'q7zkt test', { k: { return: true } });
    expect(s.plan.settings.message).toBe('q7zkt test');
    expect(s.plan.editing).toBeNull();
    expect(s.frame.quitting).toBe(false); // the q went into the message
  });

  it('steps numbers within their ranges and turns Farnsworth off at the character speed', () => {
    expect(stepField(DEFAULT_SETTINGS, 'wpm', 1).wpm).toBe(DEFAULT_SETTINGS.wpm + 1);
    const on = stepField(DEFAULT_SETTINGS, 'farnsworth', -1);
    expect(on.farnsworthWpm).toBe(DEFAULT_SETTINGS.wpm - 1);
    expect(stepField(on, 'farnsworth', 1).farnsworthWpm).toBeNull();
    expect(stepField({ ...DEFAULT_SETTINGS, weightPct: 90 }, 'weight', 1).weightPct).toBe(90);
    expect(stepField(DEFAULT_SETTINGS, 'edge', 1).edge).toBe('linear');
  });

  it('rejects a typed value out of range with the value in the message', () => {
    const r = applyTyped(DEFAULT_SETTINGS, 'tone', '5000');
    expect('error' in r && r.error).toMatch(/tone must be from 100 to 3000 Hz \(got 5000\)/);
    const f = applyTyped(DEFAULT_SETTINGS, 'farnsworth', String(DEFAULT_SETTINGS.wpm));
    expect('error' in f && f.error).toMatch(/below the character speed/);
  });

  it('plans with the core planner: unit = 1200/wpm ms (PARIS standard word)', () => {
    const r = computePlan({ ...DEFAULT_SETTINGS, message: 'E E', wpm: 20 });
    expect('plan' in r && r.plan.unitMs).toBe(1200 / 20);
    // ITU-R M.1677-1 §2: E is one dot, and a word gap is 7 units: marks [0, u] and [8u, 9u].
    expect('plan' in r && r.plan.marks).toEqual([[0, 60], [480, 540]]);
    const bad = computePlan({ ...DEFAULT_SETTINGS, message: '' });
    expect('error' in bad && bad.error).toMatch(/empty/);
  });

  it('walks the export prompt: name, check, confirm before replacing', () => {
    let s = planReducer(initialPlanState(), { type: 'export-open' });
    expect(s.exporter).toMatchObject({ format: 'wav', fileName: suggestedName(s.settings.message, 'wav'), stage: 'name' });
    s = planReducer(s, planKeyToAction('', key({ tab: true }), s, 1000)!);
    expect(s.exporter?.format).toBe('json'); // Tab cycles json, csv, c, bits, wav
    expect(s.exporter?.fileName.endsWith('.json')).toBe(true);
    s = planReducer(s, planKeyToAction('', key({ return: true }), s, 1000)!);
    expect(s.exporter?.stage).toBe('checking');
    s = planReducer(s, { type: 'export-confirm' });
    expect(planKeyToAction('y', key(), s, 1000)).toEqual({ type: 'export-force' });
    s = planReducer(s, { type: 'export-force' });
    expect(s.exporter).toMatchObject({ stage: 'writing', force: true });
    s = planReducer(s, { type: 'export-done', ok: true, text: 'wrote it' });
    expect(s.exporter).toBeNull();
    expect(s.status).toEqual({ tone: 'good', text: 'wrote it' });
  });

  it('scrolls the strip by pages but not past the end of the message', () => {
    let s = planReducer(initialPlanState({ ...DEFAULT_SETTINGS, message: 'PARIS', wpm: 20 }), { type: 'scroll', direction: 1, pageMs: 1000 });
    expect(s.scrollMs).toBe(1000);
    for (let i = 0; i < 5; i++) s = planReducer(s, { type: 'scroll', direction: 1, pageMs: 1000 });
    // PARIS without its word gap is 43 units of 60 ms at 20 wpm (PARIS standard word = 50 units): 2580 ms.
    expect(s.scrollMs).toBe(2580 - 1000);
    s = planReducer(s, { type: 'scroll', direction: -1, pageMs: 5000 });
    expect(s.scrollMs).toBe(0);
  });

  it('names exports after the message', () => {
    expect(suggestedName('VVV Q7ZKT/B JO01 <AR>', 'c')).toBe('vvv-q7zkt-b-jo01.h');
  });
});

describe('Read back workspace model', () => {
  const list = {
    dir: '/r',
    files: [
      { path: '/r/a.wav', name: 'a.wav', sizeBytes: 1000 },
      { path: '/r/b.wav', name: 'b.wav', sizeBytes: 2000 },
    ],
  };

  it('opens the chosen recording once and tracks its progress', () => {
    let s = readReducer(initialReadState(), { type: 'listed', list });
    s = readReducer(s, readKeyToAction('', key({ downArrow: true }), s)!);
    s = readReducer(s, readKeyToAction('', key({ return: true }), s)!);
    expect(s.decoding).toEqual({ path: '/r/b.wav', progress: 0, seq: 1 });
    expect(readReducer(s, { type: 'open' })).toBe(s); // a second Enter while decoding does nothing
    s = readReducer(s, { type: 'progress', path: '/r/b.wav', progress: 0.5 });
    expect(s.decoding?.progress).toBe(0.5);
  });

  it('opens at once a recording named on the command line', () => {
    const s = readReducer(initialReadState(), { type: 'listed', list: { ...list, open: '/r/b.wav' } });
    expect(s.cursor).toBe(1);
    expect(s.decoding?.path).toBe('/r/b.wav');
  });

  it('asks for a comparison when an expected message is typed after a decode', () => {
    let s = readReducer(initialReadState(), { type: 'expect-start' });
    s = readReducer(s, readKeyToAction('Q7ZKT', key(), s)!);
    s = readReducer(s, readKeyToAction('', key({ return: true }), s)!);
    expect(s.expected).toBe('Q7ZKT');
    expect(s.pane).toBe('compare');
    expect(s.comparison).toBeNull(); // nothing decoded yet
  });
});

describe('expected message through the app reducer', () => {
  it('starts from the Plan message, so the beacon text is one key away', () => {
    const s = press(initialAppState(), '2', 'e');
    expect(s.read.typing).toBe(DEFAULT_SETTINGS.message);
    const done = press(s, { k: { return: true } });
    expect(done.read.expected).toBe(DEFAULT_SETTINGS.message);
  });
});

describe('Shape workspace through the app reducer', () => {
  it('measures the recording chosen in Read back and predicts from the Plan settings', () => {
    let s = initialAppState();
    s = appReducer(s, { type: 'read', action: { type: 'listed', list: { dir: '/r', files: [{ path: '/r/q.wav', name: 'q.wav', sizeBytes: 1 }] } } });
    s = press(s, '3', { k: { return: true } });
    expect(s.shape.job?.task).toEqual({ kind: 'measure', path: '/r/q.wav' });
    s = appReducer(s, { type: 'shape', action: { type: 'report', report: {} } });
    s = press(s, 'p');
    expect(s.shape.job?.task).toMatchObject({ kind: 'predict', wpm: DEFAULT_SETTINGS.wpm, edge: DEFAULT_SETTINGS.edge, riseMs: DEFAULT_SETTINGS.riseMs });
  });

  it('says where to choose a recording when there is none', () => {
    const s = press(initialAppState(), '3', 'm');
    expect(s.shape.error?.message).toMatch(/Read back/);
    expect(s.shape.job).toBeNull();
  });
});
