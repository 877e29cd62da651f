// The part of the WebAssembly JavaScript API (a Node.js global) that the kernels use; the lib
// settings here (ES2022, no DOM) do not declare it.
declare namespace WebAssembly {
  type Exports = Record<string, unknown>;
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Memory {
    constructor(descriptor: { initial: number; maximum?: number });
    readonly buffer: ArrayBuffer;
  }
  class Instance {
    constructor(module: Module, imports?: Record<string, Record<string, unknown>>);
    readonly exports: Exports;
  }
}
