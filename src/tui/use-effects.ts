/**
 * The app's side effects, started when the state asks for them: listing recordings, decoding,
 * comparing, shape jobs, exports and the Plan's predicted bandwidth. Each result comes back as an action.
 */
import { useEffect, type Dispatch } from 'react';
import type { AppAction, AppState } from './app-model.js';
import { computePlan } from './plan/plan-model.js';
import type { Prediction } from './plan/plan-state.js';
import type { Services } from './services.js';

const num = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** Reads the figures the Plan workspace shows from a predicted shape report. */
export function predictionFromReport(report: Record<string, unknown>): Prediction {
  const at = (report.bandwidthAtDbcHz ?? {}) as Record<string, unknown>;
  const mask = (report.mask ?? {}) as Record<string, unknown>;
  return {
    state: 'ready',
    occupiedHz: num(report.occupiedBandwidthHz),
    at40DbcHz: num(at['40']),
    necessaryHz: num(report.necessaryBandwidthHz),
    k: num(report.k),
    designator: typeof report.designator === 'string' ? report.designator : null,
    pass: typeof mask.pass === 'boolean' ? mask.pass : null,
  };
}

/** Passes progress on at most every 100 ms and 2 % (and at the end), so progress does not flood renders. */
function throttled(report: (fraction: number) => void): (fraction: number) => void {
  let last = -1;
  let lastAt = 0;
  return (f) => {
    const now = Date.now();
    if ((f - last >= 0.02 && now - lastAt >= 100) || f >= 1) {
      last = f;
      lastAt = now;
      report(f);
    }
  };
}

export function useAppEffects(state: AppState, dispatch: Dispatch<AppAction>, services: Services, target: string | undefined): void {
  // Recordings list, once.
  useEffect(() => {
    let live = true;
    services
      .listRecordings(target)
      .then((list) => live && dispatch({ type: 'read', action: { type: 'listed', list } }))
      .catch((err: Error) => live && dispatch({ type: 'read', action: { type: 'list-failed', message: err.message } }));
    return () => {
      live = false;
    };
  }, [services, target, dispatch]);

  // Decoding, each request once.
  const decoding = state.read.decoding;
  const decodeSeq = decoding?.seq;
  const decodePath = decoding?.path;
  useEffect(() => {
    if (decodeSeq === undefined || decodePath === undefined) return;
    const path = decodePath;
    services
      .decode(path, throttled((progress) => dispatch({ type: 'read', action: { type: 'progress', path, progress } })))
      .then((result) => dispatch({ type: 'read', action: { type: 'decoded', result } }))
      .catch((err: Error) =>
        dispatch({ type: 'read', action: { type: 'failed', path, message: err.message, unavailable: err.name === 'NotAvailableError' } }),
      );
  }, [services, dispatch, decodeSeq, decodePath]);

  // Comparison with the expected message.
  // The expected message is planned with the Plan workspace's timing (speed, Farnsworth, weighting).
  const { comparison, result, expected } = state.read;
  const planSettings = state.plan.settings;
  useEffect(() => {
    if (comparison?.state !== 'busy' || !result || !expected) return;
    let live = true;
    const atWpm = planSettings.wpm;
    services
      .compare(result, expected, planSettings)
      .then((report) => live && dispatch({ type: 'read', action: { type: 'compared', comparison: { state: 'ready', report, atWpm } } }))
      .catch(
        (err: Error) =>
          live &&
          dispatch({ type: 'read', action: { type: 'compared', comparison: { state: 'error', message: err.message, unavailable: err.name === 'NotAvailableError' } } }),
      );
    return () => {
      live = false;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [services, dispatch, comparison, result, expected]);

  // Shape jobs, each once.
  const job = state.shape.job;
  const jobSeq = job?.seq;
  useEffect(() => {
    if (!job) return;
    const what = job.what;
    services
      .shape(job.task, throttled((progress) => dispatch({ type: 'shape', action: { type: 'progress', progress } })))
      .then((out) =>
        dispatch({ type: 'shape', action: what === 'sweep' ? { type: 'swept', sweep: out } : { type: 'report', report: out as Record<string, unknown> } }),
      )
      .catch((err: Error) => dispatch({ type: 'shape', action: { type: 'failed', message: err.message, unavailable: err.name === 'NotAvailableError' } }));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [services, dispatch, jobSeq]);

  // Exports: check for an existing file, then write (replacing only after a yes).
  const ex = state.plan.exporter;
  const settings = state.plan.settings;
  const exStage = ex?.stage;
  useEffect(() => {
    if (!ex) return;
    if (ex.stage === 'checking') {
      dispatch({ type: 'plan', action: services.fileExists(ex.fileName) ? { type: 'export-confirm' } : { type: 'export-write' } });
    } else if (ex.stage === 'writing') {
      services
        .exportPlan(settings, ex.format, ex.fileName, ex.force)
        .then((text) => dispatch({ type: 'plan', action: { type: 'export-done', ok: true, text } }))
        .catch((err: Error) => dispatch({ type: 'plan', action: { type: 'export-done', ok: false, text: err.message } }));
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [services, dispatch, exStage]);

  // Predicted bandwidth of the plan, a moment after the settings settle.
  // The tone does not change the bandwidth (the prediction keys its own carrier), so it is not a dependency.
  const { wpm, riseMs, edge, toneHz, message, farnsworthWpm, weightPct } = settings;
  useEffect(() => {
    if ('error' in computePlan({ message, wpm, riseMs, edge, toneHz, farnsworthWpm, weightPct })) return;
    let live = true;
    const abort = new AbortController(); // a newer setting makes this prediction moot: stop its worker
    const timer = setTimeout(() => {
      dispatch({ type: 'plan', action: { type: 'prediction', prediction: { state: 'busy' } } });
      services
        .shape({ kind: 'predict', wpm, farnsworthWpm, riseMs, edge, message, quick: true }, () => undefined, abort.signal)
        .then((report) => live && dispatch({ type: 'plan', action: { type: 'prediction', prediction: predictionFromReport(report as Record<string, unknown>) } }))
        .catch((err: Error) => {
          if (!live || err.name === 'AbortError') return;
          const prediction: Prediction = err.name === 'NotAvailableError' ? { state: 'unavailable' } : { state: 'error', message: err.message };
          dispatch({ type: 'plan', action: { type: 'prediction', prediction } });
        });
    }, 250);
    return () => {
      live = false;
      clearTimeout(timer);
      abort.abort();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [services, dispatch, wpm, riseMs, edge, message, farnsworthWpm, weightPct]);
}
