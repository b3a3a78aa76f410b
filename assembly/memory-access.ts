// The kernels' element reads and writes of the host's arrays, addressed by byte base and index
// (i32 at 4 bytes, f64 at 8), inlined where they are used: shared by the EM and path kernels.

// @ts-ignore: decorator
@inline export function i32At(base: usize, i: i32): i32 {
  return load<i32>(base + (<usize>i << 2));
}

// @ts-ignore: decorator
@inline export function setI32(base: usize, i: i32, v: i32): void {
  store<i32>(base + (<usize>i << 2), v);
}

// @ts-ignore: decorator
@inline export function f64At(base: usize, i: i32): f64 {
  return load<f64>(base + (<usize>i << 3));
}

// @ts-ignore: decorator
@inline export function setF64(base: usize, i: i32, v: f64): void {
  store<f64>(base + (<usize>i << 3), v);
}

// @ts-ignore: decorator
@inline export function addF64(base: usize, i: i32, v: f64): void {
  const p = base + (<usize>i << 3);
  store<f64>(p, load<f64>(p) + v);
}
