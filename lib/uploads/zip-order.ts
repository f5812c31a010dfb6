/**
 * Puts a workbook's shared strings and styles before its worksheets, without unpacking it.
 *
 * Excel saves xl/sharedStrings.xml and xl/styles.xml after the worksheets. exceljs 4.4's
 * streaming reader then parks each worksheet in a temporary file until the strings arrive, and
 * on that path it loses the ZIP entry that follows (exceljs issue 683): the strings or the
 * styles go missing, so text cells read as numbers and date cells as serial numbers. Reading
 * the parts in the order the reader handles well avoids that path and the temporary files
 * altogether. The local records are copied byte for byte, only their order and the central
 * directory's offsets change; a workbook without shared strings (every text inline) gets an
 * empty shared-strings part, for the same reason.
 * @see PKWARE. APPNOTE.TXT, .ZIP File Format Specification, version 6.3.10, sections 4.3.7
 *   (local file header), 4.3.12 (central directory header), 4.3.16 (end of central directory).
 */
const LOCAL = 0x04034b50;
const CENTRAL = 0x02014b50;
const END = 0x06054b50;

/** The parts the reader must meet before any worksheet, in this order. */
const FIRST = ["[Content_Types].xml", "_rels/.rels", "xl/workbook.xml", "xl/_rels/workbook.xml.rels", "xl/styles.xml", "xl/sharedStrings.xml"];

const EMPTY_SHARED_STRINGS = Buffer.from(
  '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n' +
    '<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="0" uniqueCount="0"/>',
);

let crcTable: Int32Array | null = null;

/** CRC-32 (ISO 3309, polynomial 0xEDB88320 reflected), as ZIP records it. */
function crc32(bytes: Uint8Array): number {
  if (crcTable === null) {
    crcTable = new Int32Array(256);
    for (let n = 0; n < 256; n++) {
      let c = n;
      for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
      crcTable[n] = c;
    }
  }
  let crc = -1;
  for (let i = 0; i < bytes.length; i++) crc = crcTable[(crc ^ bytes[i]) & 0xff] ^ (crc >>> 8);
  return (crc ^ -1) >>> 0;
}

interface Entry {
  name: string;
  /** The central directory record, to be copied with a new local offset. */
  central: Buffer;
  /** The local record (header, data and any data descriptor). */
  local: Buffer;
}

function storedEntry(name: string, data: Buffer): Entry {
  const nameBytes = Buffer.from(name, "utf8");
  const crc = crc32(data);
  const local = Buffer.alloc(30 + nameBytes.length + data.length);
  local.writeUInt32LE(LOCAL, 0);
  local.writeUInt16LE(20, 4); // version needed: 2.0
  local.writeUInt32LE(crc, 14);
  local.writeUInt32LE(data.length, 18);
  local.writeUInt32LE(data.length, 22);
  local.writeUInt16LE(nameBytes.length, 26);
  nameBytes.copy(local, 30);
  data.copy(local, 30 + nameBytes.length);
  const central = Buffer.alloc(46 + nameBytes.length);
  central.writeUInt32LE(CENTRAL, 0);
  central.writeUInt16LE(20, 4);
  central.writeUInt16LE(20, 6);
  central.writeUInt32LE(crc, 16);
  central.writeUInt32LE(data.length, 20);
  central.writeUInt32LE(data.length, 24);
  central.writeUInt16LE(nameBytes.length, 28);
  nameBytes.copy(central, 46);
  return { name, central, local };
}

/**
 * The same ZIP archive with the parts of {@link FIRST} first. Returns the input unchanged when
 * it cannot read the archive's directory (ZIP64, a damaged file): the reader then decides.
 */
export function workbookInReadingOrder(input: Uint8Array): Uint8Array {
  const bytes = Buffer.from(input.buffer, input.byteOffset, input.byteLength);
  let end = -1;
  for (let i = bytes.length - 22; i >= Math.max(0, bytes.length - 22 - 0xffff); i--) {
    if (bytes.readUInt32LE(i) === END) {
      end = i;
      break;
    }
  }
  if (end === -1) return input;
  const count = bytes.readUInt16LE(end + 10);
  const directoryOffset = bytes.readUInt32LE(end + 16);
  if (count === 0xffff || directoryOffset === 0xffffffff || directoryOffset > end) return input;

  const records: { name: string; central: Buffer; offset: number }[] = [];
  let at = directoryOffset;
  for (let k = 0; k < count; k++) {
    if (at + 46 > end || bytes.readUInt32LE(at) !== CENTRAL) return input;
    const nameLength = bytes.readUInt16LE(at + 28);
    const size = 46 + nameLength + bytes.readUInt16LE(at + 30) + bytes.readUInt16LE(at + 32);
    const offset = bytes.readUInt32LE(at + 42);
    if (offset === 0xffffffff || offset >= directoryOffset || bytes.readUInt32LE(offset) !== LOCAL) return input;
    records.push({ name: bytes.toString("utf8", at + 46, at + 46 + nameLength), central: bytes.subarray(at, at + size), offset });
    at += size;
  }
  // A local record runs to the start of the next one (data descriptors included).
  const byOffset = [...records].sort((a, b) => a.offset - b.offset);
  const entries: Entry[] = byOffset.map((r, k) => ({
    name: r.name,
    central: r.central,
    local: bytes.subarray(r.offset, k + 1 < byOffset.length ? byOffset[k + 1].offset : directoryOffset),
  }));
  if (!entries.some((e) => e.name === "xl/sharedStrings.xml")) entries.push(storedEntry("xl/sharedStrings.xml", EMPTY_SHARED_STRINGS));
  const rank = (name: string) => {
    const i = FIRST.indexOf(name);
    return i === -1 ? FIRST.length : i;
  };
  const ordered = entries.map((e, k) => ({ e, k })).sort((a, b) => rank(a.e.name) - rank(b.e.name) || a.k - b.k).map((x) => x.e);

  const locals = ordered.reduce((n, e) => n + e.local.length, 0);
  const centrals = ordered.reduce((n, e) => n + e.central.length, 0);
  const out = Buffer.alloc(locals + centrals + 22);
  let offset = 0;
  const offsets: number[] = [];
  for (const e of ordered) {
    offsets.push(offset);
    offset += e.local.copy(out, offset);
  }
  ordered.forEach((e, k) => {
    e.central.copy(out, offset);
    out.writeUInt32LE(offsets[k], offset + 42);
    offset += e.central.length;
  });
  out.writeUInt32LE(END, offset);
  out.writeUInt16LE(ordered.length, offset + 8);
  out.writeUInt16LE(ordered.length, offset + 10);
  out.writeUInt32LE(centrals, offset + 12);
  out.writeUInt32LE(locals, offset + 16);
  return out;
}

/** One part of a ZIP archive as stored: its name, compression method (0 stored, 8 deflated) and bytes. */
export interface ZipPart {
  name: string;
  method: number;
  data: Buffer;
}

/**
 * The parts of a ZIP archive, from its central directory (sizes as the directory gives them);
 * null when the directory cannot be read (ZIP64, a damaged file).
 */
export function zipParts(input: Uint8Array): ZipPart[] | null {
  const bytes = Buffer.from(input.buffer, input.byteOffset, input.byteLength);
  let end = -1;
  for (let i = bytes.length - 22; i >= Math.max(0, bytes.length - 22 - 0xffff); i--) {
    if (bytes.readUInt32LE(i) === END) {
      end = i;
      break;
    }
  }
  if (end === -1) return null;
  const count = bytes.readUInt16LE(end + 10);
  let at = bytes.readUInt32LE(end + 16);
  if (count === 0xffff || at > end) return null;
  const parts: ZipPart[] = [];
  for (let k = 0; k < count; k++) {
    if (at + 46 > end || bytes.readUInt32LE(at) !== CENTRAL) return null;
    const method = bytes.readUInt16LE(at + 10);
    const compressed = bytes.readUInt32LE(at + 20);
    const nameLength = bytes.readUInt16LE(at + 28);
    const offset = bytes.readUInt32LE(at + 42);
    if (offset + 30 > bytes.length || bytes.readUInt32LE(offset) !== LOCAL) return null;
    const start = offset + 30 + bytes.readUInt16LE(offset + 26) + bytes.readUInt16LE(offset + 28);
    if (start + compressed > bytes.length) return null;
    parts.push({ name: bytes.toString("utf8", at + 46, at + 46 + nameLength), method, data: bytes.subarray(start, start + compressed) });
    at += 46 + nameLength + bytes.readUInt16LE(at + 30) + bytes.readUInt16LE(at + 32);
  }
  return parts;
}
