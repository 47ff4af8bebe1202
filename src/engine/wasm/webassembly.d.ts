/**
 * The few WebAssembly globals the record kernel uses (Node has them; the "ES2022" lib this
 * project compiles against does not declare them, and the DOM lib would bring much else).
 */
declare namespace WebAssembly {
  function validate(bytes: Uint8Array): boolean;
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Memory {
    constructor(descriptor: { initial: number; maximum?: number });
    readonly buffer: ArrayBuffer;
  }
  class Global {
    readonly value: number;
  }
  class Instance {
    constructor(module: Module, imports: Record<string, Record<string, unknown>>);
    readonly exports: Record<string, unknown>;
  }
}
