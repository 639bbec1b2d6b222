/**
 * The part of the WebAssembly JavaScript interface (W3C WebAssembly JS API) the core uses. Node has
 * it built in; its type package for Node 20 does not declare it (the DOM library would, with much
 * else that Node lacks).
 */
declare namespace WebAssembly {
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Memory {
    constructor(descriptor: { initial: number; maximum?: number });
    readonly buffer: ArrayBuffer;
  }
  class Instance {
    constructor(module: Module, imports?: Record<string, Record<string, unknown>>);
    readonly exports: Record<string, unknown>;
  }
}
