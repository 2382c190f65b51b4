/**
 * A reader for Apache Thrift's compact protocol (the Thrift project's "thrift-compact-protocol"
 * specification), enough for Parquet's page headers and footer: a struct read into { [field id]: value }.
 * Integers are zigzag varints (as numbers; a 64-bit value past 2^53 loses precision, and Parquet
 * holds none that matter: offsets, sizes and counts), binaries are skipped as byte counts or read
 * as UTF-8 text, lists, sets and maps are read in full. Pure.
 */
export type ThriftValue = number | boolean | string | ThriftStruct | ThriftValue[] | Map<ThriftValue, ThriftValue>;
export interface ThriftStruct {
  [field: number]: ThriftValue;
}

const STOP = 0;
const TRUE = 1;
const FALSE = 2;
const BYTE = 3;
const DOUBLE = 7;
const BINARY = 8;
const LIST = 9;
const SET = 10;
const MAP = 11;
const STRUCT = 12;

/** Structs within structs deeper than this are a broken file, not a stack overflow. */
const DEEPEST = 64;

/**
 * Reads a struct at reader.offset (bytes of `view`), leaving the offset after its stop byte.
 * Binaries are byte counts unless `texts` is set; `what` names the thing in errors.
 */
export function readStruct(reader: { view: DataView; offset: number }, texts = false, what = 'a page header'): ThriftStruct {
  const { view } = reader;
  const early = () => new Error(`${what} ends early`);
  let depth = 0;
  const byte = () => {
    if (reader.offset >= view.byteLength) throw early();
    return view.getUint8(reader.offset++);
  };
  const varint = () => {
    let value = 0;
    for (let shift = 0; ; shift += 7) {
      const b = byte();
      value += (b & 0x7f) * 2 ** shift;
      if (b < 0x80) return value;
      if (shift > 63) throw new Error(`${what} holds a broken number`);
    }
  };
  const zigzag = () => {
    const v = varint();
    return v % 2 === 0 ? v / 2 : -(v + 1) / 2;
  };
  const value = (type: number): ThriftValue => {
    switch (type) {
      case TRUE:
        return true;
      case FALSE:
        return false;
      case BYTE:
        return (byte() << 24) >> 24;
      case 4:
      case 5:
      case 6:
        return zigzag();
      case DOUBLE: {
        if (reader.offset + 8 > view.byteLength) throw early();
        const d = view.getFloat64(reader.offset, true);
        reader.offset += 8;
        return d;
      }
      case BINARY: {
        const length = varint();
        if (reader.offset + length > view.byteLength) throw early();
        const start = view.byteOffset + reader.offset;
        reader.offset += length;
        return texts ? Buffer.from(view.buffer, start, length).toString('utf8') : length;
      }
      case LIST:
      case SET: {
        const head = byte();
        const size = head >> 4 === 15 ? varint() : head >> 4;
        const element = head & 15;
        // Every element takes at least one byte: a larger count is a broken file, not a huge array.
        if (size > view.byteLength - reader.offset) throw early();
        // Booleans in a collection are one byte each (1 true, otherwise false).
        return Array.from({ length: size }, () => (element === TRUE || element === FALSE ? byte() === 1 : value(element)));
      }
      case MAP: {
        const size = varint();
        if (2 * size > view.byteLength - reader.offset) throw early();
        const out = new Map<ThriftValue, ThriftValue>();
        if (size === 0) return out;
        const types = byte();
        for (let i = 0; i < size; i++) out.set(value(types >> 4), value(types & 15));
        return out;
      }
      case STRUCT:
        return struct();
      default:
        throw new Error(`${what} holds an unknown Thrift type ${type}`);
    }
  };
  const struct = (): ThriftStruct => {
    if (++depth > DEEPEST) throw new Error(`${what} nests deeper than ${DEEPEST} levels`);
    const out: ThriftStruct = {};
    let field = 0;
    for (;;) {
      const head = byte();
      const type = head & 15;
      if (type === STOP) {
        depth--;
        return out;
      }
      field = head >> 4 ? field + (head >> 4) : zigzag();
      out[field] = value(type);
    }
  };
  return struct();
}
