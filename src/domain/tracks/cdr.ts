/**
 * A small CDR decoder driven by the text of a ROS 2 message definition (`ros2msg` schemas as MCAP
 * logs carry them): the first block defines the top-level message, each further block starts with a
 * line `MSG: package/Name` (blocks separated by a line of `=`). Supported: the primitive types, strings,
 * nested messages, fixed arrays `T[N]`, sequences `T[]` and bounded sequences `T[<=N]`, constants
 * (skipped) and default values (ignored). Encapsulation: plain CDR, little- or big-endian, as the
 * 4-byte header says. Alignment follows the OMG CDR rules: a primitive of n bytes starts at a
 * multiple of n counted from the end of the header; a string or sequence starts with a 4-byte count.
 * Pure: bytes in, plain objects out; 64-bit integers are returned as numbers.
 */
import { DomainError } from '@/domain/errors';

type Primitive =
  | 'bool' | 'byte' | 'char' | 'int8' | 'uint8' | 'int16' | 'uint16' | 'int32' | 'uint32'
  | 'int64' | 'uint64' | 'float32' | 'float64' | 'string' | 'wstring';

const PRIMITIVE_SIZE: Record<Exclude<Primitive, 'string' | 'wstring'>, number> = {
  bool: 1, byte: 1, char: 1, int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4,
  int64: 8, uint64: 8, float32: 4, float64: 8,
};

function isPrimitive(t: string): t is Primitive {
  return t === 'string' || t === 'wstring' || Object.prototype.hasOwnProperty.call(PRIMITIVE_SIZE, t);
}

export interface CdrField {
  name: string;
  /** A primitive type or a full message name `package/Name`. */
  type: string;
  /** 'single', a fixed array of `length`, or a (possibly bounded) sequence with a count before it. */
  kind: 'single' | 'array' | 'sequence';
  length?: number;
}

export interface CdrSchema {
  /** Full name of the top-level message. */
  root: string;
  definitions: Map<string, CdrField[]>;
}

/** Definitions a schema text may leave out because every ROS 2 system has them. */
const BUILTIN: Record<string, CdrField[]> = {
  'builtin_interfaces/Time': [
    { name: 'sec', type: 'int32', kind: 'single' },
    { name: 'nanosec', type: 'uint32', kind: 'single' },
  ],
  'builtin_interfaces/Duration': [
    { name: 'sec', type: 'int32', kind: 'single' },
    { name: 'nanosec', type: 'uint32', kind: 'single' },
  ],
};

/** `geometry_msgs/msg/Point` and `geometry_msgs/Point` name the same message. */
function normaliseName(name: string): string {
  return name.trim().replace(/\/msg\//, '/');
}

function packageOf(name: string): string {
  const i = name.indexOf('/');
  return i < 0 ? '' : name.slice(0, i);
}

function resolveType(raw: string, pkg: string): string {
  if (raw === 'time' || raw === 'duration') return raw === 'time' ? 'builtin_interfaces/Time' : 'builtin_interfaces/Duration';
  if (isPrimitive(raw)) return raw;
  if (raw.includes('/')) return normaliseName(raw);
  if (raw === 'Header') return 'std_msgs/Header';
  return pkg ? `${pkg}/${raw}` : raw;
}

function schemaError(message: string): DomainError {
  return new DomainError('invalid_input', `the message definition of the topic cannot be read: ${message}`, 'topic');
}

function parseField(line: string, pkg: string): CdrField | null {
  // type name [default] | type NAME=value (a constant, not in the bytes)
  const m = /^([A-Za-z][\w/]*)(<=\d+)?(\[(<=)?(\d*)\])?\s+([A-Za-z]\w*)(\s*=.*|\s+.*)?$/.exec(line);
  if (!m) throw schemaError(`line '${line}' is not 'type name'`);
  const [, rawType, , array, bounded, size, name, rest] = m;
  if (rest !== undefined && /^\s*=/.test(rest)) return null;
  const type = resolveType(rawType!, pkg);
  if (!array) return { name: name!, type, kind: 'single' };
  if (bounded || size === '') return { name: name!, type, kind: 'sequence' };
  return { name: name!, type, kind: 'array', length: Number(size) };
}

/** Parse a ros2msg schema text; `rootName` is the schema's name (e.g. geometry_msgs/msg/PoseStamped). */
export function parseRos2Schema(rootName: string, text: string): CdrSchema {
  const root = normaliseName(rootName);
  const definitions = new Map<string, CdrField[]>();
  const blocks = text.split(/^=+\s*$/m);
  blocks.forEach((block, index) => {
    const lines = block.split(/\r?\n/).map((l) => l.replace(/#.*$/, '').trim()).filter((l) => l !== '');
    let name = root;
    if (index > 0) {
      const header = lines.shift();
      const m = header ? /^MSG:\s*(\S+)$/.exec(header) : null;
      if (!m) throw schemaError(`a block after '===' must start with 'MSG: package/Name', found '${header ?? ''}'`);
      name = normaliseName(m[1]!);
    }
    const pkg = packageOf(name);
    const fields: CdrField[] = [];
    for (const line of lines) {
      const f = parseField(line, pkg);
      if (f) fields.push(f);
    }
    definitions.set(name, fields);
  });
  for (const [name, fields] of Object.entries(BUILTIN)) if (!definitions.has(name)) definitions.set(name, fields);
  // Every nested type must be defined; say which is missing now rather than mid-message.
  for (const [name, fields] of definitions) {
    for (const f of fields) {
      if (!isPrimitive(f.type) && !definitions.has(f.type)) throw schemaError(`'${name}' uses '${f.type}', which the schema does not define`);
    }
  }
  return { root, definitions };
}

/** A reader over one CDR payload (after its encapsulation header). */
class CdrReader {
  private readonly view: DataView;
  private offset = 4;
  constructor(private readonly bytes: Uint8Array, private readonly little: boolean, private readonly maxAlign: number) {
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }

  private align(size: number) {
    const a = Math.min(size, this.maxAlign);
    const rel = this.offset - 4;
    const pad = (a - (rel % a)) % a;
    this.offset += pad;
  }

  private need(n: number) {
    if (this.offset + n > this.bytes.length) throw new RangeError(`message ends at byte ${this.bytes.length}, ${n} more needed at byte ${this.offset}`);
  }

  primitive(type: Exclude<Primitive, 'string' | 'wstring'>): number | boolean {
    const size = PRIMITIVE_SIZE[type];
    this.align(size);
    this.need(size);
    const at = this.offset;
    this.offset += size;
    const v = this.view;
    switch (type) {
      case 'bool': return v.getUint8(at) !== 0;
      case 'byte': case 'uint8': case 'char': return v.getUint8(at);
      case 'int8': return v.getInt8(at);
      case 'int16': return v.getInt16(at, this.little);
      case 'uint16': return v.getUint16(at, this.little);
      case 'int32': return v.getInt32(at, this.little);
      case 'uint32': return v.getUint32(at, this.little);
      case 'int64': return Number(v.getBigInt64(at, this.little));
      case 'uint64': return Number(v.getBigUint64(at, this.little));
      case 'float32': return v.getFloat32(at, this.little);
      case 'float64': return v.getFloat64(at, this.little);
    }
  }

  count(): number {
    return this.primitive('uint32') as number;
  }

  string(): string {
    const length = this.count();
    this.need(length);
    // The length counts the terminating NUL.
    const end = length > 0 && this.bytes[this.offset + length - 1] === 0 ? this.offset + length - 1 : this.offset + length;
    const s = new TextDecoder().decode(this.bytes.subarray(this.offset, end));
    this.offset += length;
    return s;
  }

  wstring(): string {
    const length = this.count();
    let s = '';
    for (let i = 0; i < length; i++) s += String.fromCharCode(this.primitive('uint16') as number);
    return s.replace(/\u0000$/, '');
  }
}

export type CdrValue = number | boolean | string | CdrValue[] | { [field: string]: CdrValue };

function readValue(reader: CdrReader, schema: CdrSchema, type: string): CdrValue {
  if (type === 'string') return reader.string();
  if (type === 'wstring') return reader.wstring();
  if (isPrimitive(type)) return reader.primitive(type as Exclude<Primitive, 'string' | 'wstring'>);
  const fields = schema.definitions.get(type)!;
  const out: { [field: string]: CdrValue } = {};
  for (const f of fields) {
    if (f.kind === 'single') out[f.name] = readValue(reader, schema, f.type);
    else {
      const n = f.kind === 'array' ? f.length! : reader.count();
      if (n > 10_000_000) throw new RangeError(`sequence '${f.name}' claims ${n} elements`);
      const list: CdrValue[] = [];
      for (let i = 0; i < n; i++) list.push(readValue(reader, schema, f.type));
      out[f.name] = list;
    }
  }
  return out;
}

/**
 * Encapsulation kinds read: plain CDR, big- or little-endian (what ROS 2 writes). Parameter lists and
 * XCDR2 (delimited sequences, 4-byte maximum alignment) are refused rather than misread.
 */
const ENCAPSULATION: Record<number, { little: boolean; maxAlign: number }> = {
  0x00: { little: false, maxAlign: 8 }, // CDR_BE
  0x01: { little: true, maxAlign: 8 }, // CDR_LE
};

/**
 * Decode one CDR message. Throws a RangeError when the bytes end early or the encapsulation is not
 * one that is read (parameter lists and mutable types are not).
 */
export function decodeCdr(schema: CdrSchema, bytes: Uint8Array): { [field: string]: CdrValue } {
  if (bytes.length < 4) throw new RangeError('a CDR message needs a 4-byte encapsulation header');
  const kind = ENCAPSULATION[(bytes[0]! << 8) | bytes[1]!];
  if (!kind) throw new RangeError(`encapsulation 0x${bytes[0]!.toString(16).padStart(2, '0')}${bytes[1]!.toString(16).padStart(2, '0')} is not plain CDR (0x0000 big-endian or 0x0001 little-endian); re-record the topic with plain CDR`);
  const reader = new CdrReader(bytes, kind.little, kind.maxAlign);
  return readValue(reader, schema, schema.root) as { [field: string]: CdrValue };
}

/** Encapsulation identifiers for writers (tests, fixtures). */
export const CDR_LE = 0x01;
export const CDR_BE = 0x00;
