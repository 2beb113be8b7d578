/**
 * `createKernel`: a module compiled once, a memory that grows to what a call asks for and is kept,
 * and null (for the caller's JavaScript loop) where the binary is not WebAssembly.
 */
import { describe, expect, it } from 'vitest';
import { createKernel, releaseKernelMemory } from '../kernels.js';

/**
 * A tiny module assembled by hand (so this test needs no assembler):
 * (module (import "env" "memory" (memory 1))
 *   (func (export "twice") (param $at i32) (f64.store (local.get $at) (f64.add (f64.load (local.get $at)) (f64.load (local.get $at))))))
 */
const TWICE = Uint8Array.from([
  0, 97, 115, 109, 1, 0, 0, 0, 1, 5, 1, 96, 1, 127, 0, 2, 15, 1, 3, 101, 110, 118, 6, 109, 101, 109, 111, 114, 121, 2, 0, 1, 3, 2, 1, 0,
  7, 9, 1, 5, 116, 119, 105, 99, 101, 0, 0, 10, 20, 1, 18, 0, 32, 0, 32, 0, 43, 3, 0, 32, 0, 43, 3, 0, 160, 57, 3, 0, 11,
]);
const base64 = Buffer.from(TWICE).toString('base64');

describe('createKernel', () => {
  it('runs the module on its memory, keeps the memory and grows it when a call needs more', () => {
    const kernel = createKernel<{ twice(at: number): void }>(base64);
    const room = kernel.room(16)!;
    expect(room).not.toBeNull();
    room.f64[1] = 0.1;
    room.exports.twice(8);
    expect(room.f64[1]).toBe(0.2);
    // The same room while it is big enough.
    expect(kernel.room(65536)).toBe(room);
    // Grown: a new view of the same memory (contents kept), and the function still works on it.
    const big = kernel.room(3 * 65536 + 8)!;
    expect(big.u8.byteLength).toBeGreaterThanOrEqual(3 * 65536 + 8);
    expect(big.f64[1]).toBe(0.2);
    big.f64[3 * 8192] = 1.5;
    big.exports.twice(3 * 65536);
    expect(big.f64[3 * 8192]).toBe(3);
  });
  it('lets go of the kept memories on releaseKernelMemory, and works on a fresh one after', () => {
    const kernel = createKernel<{ twice(at: number): void }>(base64);
    const other = createKernel<{ twice(at: number): void }>(base64);
    const big = kernel.room(4 * 65536)!;
    const small = other.room(8)!;
    big.f64[1] = 0.25;
    releaseKernelMemory();
    for (const [k, before] of [[kernel, big], [other, small]] as const) {
      const fresh = k.room(8)!;
      expect(fresh).not.toBe(before);
      expect(fresh.exports).not.toBe(before.exports); // a new instance: callers that keep data there see it
      expect(fresh.u8.byteLength).toBe(65536);
      expect(fresh.f64[1]).toBe(0);
      fresh.f64[1] = 0.75;
      fresh.exports.twice(8);
      expect(fresh.f64[1]).toBe(1.5);
    }
  });
  it('gives null rooms for a binary that is not WebAssembly, and for a size it cannot address', () => {
    expect(createKernel(Buffer.from('not a module').toString('base64')).room(8)).toBeNull();
    expect(createKernel(base64).room(2 ** 31)).toBeNull();
    expect(createKernel(base64).room(Number.NaN)).toBeNull();
  });
});
