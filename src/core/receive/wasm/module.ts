import { SEQUENCE_STEP_WASM_BASE64 } from './sequence-step.wasm.js';

let compiled: WebAssembly.Module | null = null;

/**
 * The sequence decoder's step, compiled once per thread on first use. The engine keeps one copy of
 * a module's machine code for the whole process, so every worker thread that compiles the same
 * bytes gets the code (and its optimised tier, once made) that the first one made.
 */
export function sequenceStepModule(): WebAssembly.Module {
  if (typeof WebAssembly === 'undefined') throw new Error('the decoder needs WebAssembly, which this Node.js has turned off (node --jitless?)');
  compiled ??= new WebAssembly.Module(Uint8Array.from(atob(SEQUENCE_STEP_WASM_BASE64), (c) => c.charCodeAt(0)));
  return compiled;
}
