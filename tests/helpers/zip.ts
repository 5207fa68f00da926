// Building and taking apart zip archives in tests, to make hostile .xlsx files on purpose
// (PKWARE APPNOTE.TXT 6.3.x: local file headers, data, then the central directory and its end record).
import { crc32, deflateRawSync, inflateRawSync } from 'node:zlib';

/** One file inside an archive. */
export interface ZipPart {
  name: string;
  data: Buffer;
}

/** How a part is written: stored or deflated, with honest or lying sizes. */
export interface ZipPartOptions extends ZipPart {
  stored?: boolean;
  /** The unpacked size the headers claim (the real one by default). */
  declaredSize?: number;
  /** Already-deflated data to write as is (its real unpacked size must then be given in declaredSize). */
  deflated?: Buffer;
}

/** The parts of an archive, as its central directory lists them. */
export function readZip(zip: Buffer): ZipPart[] {
  const eocd = zip.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]));
  const count = zip.readUInt16LE(eocd + 10);
  let p = zip.readUInt32LE(eocd + 16);
  const parts: ZipPart[] = [];
  for (let i = 0; i < count; i++) {
    const method = zip.readUInt16LE(p + 10);
    const size = zip.readUInt32LE(p + 20);
    const nameLength = zip.readUInt16LE(p + 28);
    const skip = nameLength + zip.readUInt16LE(p + 30) + zip.readUInt16LE(p + 32);
    const local = zip.readUInt32LE(p + 42);
    const name = zip.toString('utf8', p + 46, p + 46 + nameLength);
    const start = local + 30 + zip.readUInt16LE(local + 26) + zip.readUInt16LE(local + 28);
    const raw = zip.subarray(start, start + size);
    parts.push({ name, data: method === 8 ? inflateRawSync(raw) : Buffer.from(raw) });
    p += 46 + skip;
  }
  return parts;
}

function localHeader(name: Buffer, method: number, crc: number, compressed: number, size: number): Buffer {
  const h = Buffer.alloc(30);
  h.writeUInt32LE(0x04034b50, 0);
  h.writeUInt16LE(20, 4);
  h.writeUInt16LE(method, 8);
  h.writeUInt32LE(crc, 14);
  h.writeUInt32LE(compressed, 18);
  h.writeUInt32LE(size, 22);
  h.writeUInt16LE(name.length, 26);
  return Buffer.concat([h, name]);
}

/** Local header and data of one part, and its central directory record for a given offset. */
function encode(part: ZipPartOptions) {
  const name = Buffer.from(part.name);
  const method = part.stored ? 0 : 8;
  const body = part.deflated ?? (part.stored ? part.data : deflateRawSync(part.data));
  const size = part.declaredSize ?? part.data.length;
  const crc = part.deflated ? 0 : crc32(part.data);
  const local = Buffer.concat([localHeader(name, method, crc, body.length, size), body]);
  const central = (offset: number) => {
    const c = Buffer.alloc(46);
    c.writeUInt32LE(0x02014b50, 0);
    c.writeUInt16LE(20, 4);
    c.writeUInt16LE(20, 6);
    c.writeUInt16LE(method, 10);
    c.writeUInt32LE(crc, 16);
    c.writeUInt32LE(body.length, 20);
    c.writeUInt32LE(size, 24);
    c.writeUInt16LE(name.length, 28);
    c.writeUInt32LE(offset, 42);
    return Buffer.concat([c, name]);
  };
  return { local, central };
}

function endRecord(count: number, dirSize: number, dirOffset: number): Buffer {
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(count, 8);
  end.writeUInt16LE(count, 10);
  end.writeUInt32LE(dirSize, 12);
  end.writeUInt32LE(dirOffset, 16);
  return end;
}

/**
 * Writes an archive. `hidden` parts are written like the others but left out of the central directory
 * (a streaming reader still meets them; a reader of the directory never does).
 */
export function writeZip(parts: ZipPartOptions[], hidden: ZipPartOptions[] = []): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const part of parts) {
    const { local, central } = encode(part);
    locals.push(local);
    centrals.push(central(offset));
    offset += local.length;
  }
  for (const part of hidden) {
    const { local } = encode(part);
    locals.push(local);
    offset += local.length;
  }
  const dir = Buffer.concat(centrals);
  return Buffer.concat([...locals, dir, endRecord(parts.length, dir.length, offset)]);
}

/** A copy of an archive whose local header for `name` claims another unpacked size than its directory. */
export function withLocalSizeMismatch(zip: Buffer, name: string): Buffer {
  const copy = Buffer.from(zip);
  const at = copy.indexOf(Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04])]), 0);
  for (let p = at; p >= 0; p = copy.indexOf(Buffer.from([0x50, 0x4b, 0x03, 0x04]), p + 4)) {
    const nameLength = copy.readUInt16LE(p + 26);
    if (copy.toString('utf8', p + 30, p + 30 + nameLength) === name) {
      copy.writeUInt32LE(copy.readUInt32LE(p + 22) + 1_000_000, p + 22);
      return copy;
    }
  }
  throw new Error(`${name} is not in the archive`);
}
