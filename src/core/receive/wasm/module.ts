import { MIXER_WASM_BASE64 } from './mixer.wasm.js';
import { SEQUENCE_STEP_WASM_BASE64 } from './sequence-step.wasm.js';

const compiled = new Map<string, WebAssembly.Module>();

/**
 * A module of the core's WebAssembly, compiled once per thread on first use. The engine keeps one
 * copy of a module's machine code for the whole process, so every worker thread that compiles the
 * same bytes gets the code (and its optimised tier, once made) that the first one made.
 */
function moduleOf(base64: string): WebAssembly.Module {
  if (typeof WebAssembly === 'undefined') throw new Error('the decoder needs WebAssembly, which this Node.js has turned off (node --jitless?)');
  let m = compiled.get(base64);
  if (!m) {
    m = new WebAssembly.Module(Uint8Array.from(atob(base64), (c) => c.charCodeAt(0)));
    compiled.set(base64, m);
  }
  return m;
}

/** The sequence decoder's step (sequence-step.as.ts). */
export function sequenceStepModule(): WebAssembly.Module {
  return moduleOf(SEQUENCE_STEP_WASM_BASE64);
}

/** The mixer's sample loop (mixer.as.ts). */
export function mixerModule(): WebAssembly.Module {
  return moduleOf(MIXER_WASM_BASE64);
}
