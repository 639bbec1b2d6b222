import { compiledModule } from '../../wasm.js';
import { MIXER_WASM_BASE64 } from './mixer.wasm.js';
import { SEQUENCE_STEP_WASM_BASE64 } from './sequence-step.wasm.js';

/** The sequence decoder's step (sequence-step.as.ts). */
export function sequenceStepModule(): WebAssembly.Module {
  return compiledModule(SEQUENCE_STEP_WASM_BASE64);
}

/** The mixer's sample loop (mixer.as.ts). */
export function mixerModule(): WebAssembly.Module {
  return compiledModule(MIXER_WASM_BASE64);
}
