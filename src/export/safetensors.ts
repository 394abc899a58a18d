import { UserError } from '../core/index.js';

/**
 * The safetensors file layout (a published format for tensors): an 8-byte little-endian
 * unsigned header length N, N bytes of JSON header mapping each tensor name to
 * `{dtype, shape, data_offsets: [begin, end]}` (offsets into the data section) plus an optional
 * `__metadata__` map of strings to strings, then the raw little-endian tensor data.
 * cairn writes only F64 tensors; the header is padded with spaces to a multiple of 8 bytes.
 */
export interface Tensor {
  readonly name: string;
  readonly shape: readonly number[];
  readonly data: Float64Array;
}

export function encodeSafetensors(tensors: readonly Tensor[], metadata: Record<string, string>): Uint8Array {
  const header: Record<string, unknown> = { __metadata__: metadata };
  let offset = 0;
  for (const t of tensors) {
    const bytes = t.data.length * 8;
    header[t.name] = { dtype: 'F64', shape: [...t.shape], data_offsets: [offset, offset + bytes] };
    offset += bytes;
  }
  let json = JSON.stringify(header);
  json += ' '.repeat((8 - (Buffer.byteLength(json) % 8)) % 8);
  const head = Buffer.from(json, 'utf8');
  const out = Buffer.alloc(8 + head.length + offset);
  out.writeBigUInt64LE(BigInt(head.length), 0);
  head.copy(out, 8);
  let at = 8 + head.length;
  for (const t of tensors) {
    for (let i = 0; i < t.data.length; i++, at += 8) out.writeDoubleLE(t.data[i], at);
  }
  return out;
}

export function decodeSafetensors(bytes: Uint8Array, where: string): { tensors: Map<string, Tensor>; metadata: Record<string, string> } {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const bad = (why: string): UserError => new UserError(`${where} is not a valid safetensors file: ${why}`);
  if (buf.length < 8) throw bad('shorter than its 8-byte header length');
  const n = Number(buf.readBigUInt64LE(0));
  if (8 + n > buf.length) throw bad(`header length ${n} runs past the end of the file`);
  let header: Record<string, { dtype: string; shape: number[]; data_offsets: [number, number] } | Record<string, string>>;
  try {
    header = JSON.parse(buf.subarray(8, 8 + n).toString('utf8'));
  } catch (e) {
    throw bad(`header is not JSON (${(e as Error).message})`);
  }
  const data = buf.subarray(8 + n);
  const tensors = new Map<string, Tensor>();
  for (const [name, info] of Object.entries(header)) {
    if (name === '__metadata__') continue;
    const t = info as { dtype: string; shape: number[]; data_offsets: [number, number] };
    if (t.dtype !== 'F64') throw bad(`tensor ${name} has dtype ${t.dtype}; cairn reads F64`);
    const [b, e] = t.data_offsets;
    const count = t.shape.reduce((a, x) => a * x, 1);
    if (e - b !== count * 8 || e > data.length) throw bad(`tensor ${name}: offsets [${b}, ${e}] do not fit shape [${t.shape}]`);
    const arr = new Float64Array(count);
    for (let i = 0; i < count; i++) arr[i] = data.readDoubleLE(b + 8 * i);
    tensors.set(name, { name, shape: t.shape, data: arr });
  }
  return { tensors, metadata: (header.__metadata__ as Record<string, string>) ?? {} };
}
