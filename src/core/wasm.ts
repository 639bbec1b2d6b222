const compiled = new Map<string, WebAssembly.Module>();

/**
 * A WebAssembly module of keyform's (carried as base64 in a generated `*.wasm.ts`), compiled once
 * per thread on first use. The engine keeps one copy of a module's machine code for the whole
 * process, so every worker thread that compiles the same bytes gets the code (and its optimised
 * tier, once made) that the first one made.
 */
export function compiledModule(base64: string): WebAssembly.Module {
  if (typeof WebAssembly === 'undefined') throw new Error('keyform needs WebAssembly, which this Node.js has turned off (node --jitless?)');
  let m = compiled.get(base64);
  if (!m) {
    m = new WebAssembly.Module(Uint8Array.from(atob(base64), (c) => c.charCodeAt(0)));
    compiled.set(base64, m);
  }
  return m;
}
