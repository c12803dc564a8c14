import fs from "node:fs";
import { DataError } from "../../../errors.ts";

/**
 * The central directory of a zip file (PKWARE APPNOTE.TXT 6.3: 4.3.12 central
 * directory headers, 4.3.16 end of central directory record, 4.3.14–15 and 4.5.3 the
 * Zip64 forms numpy.savez uses for large members), and where each member's data start
 * (4.3.7: after the local header, whose name and extra field may differ in length from
 * the central copy).
 */
export interface ZipMember {
  name: string;
  /** 0 stored, 8 deflated (4.4.5). */
  method: number;
  crc32: number;
  compressedSize: number;
  uncompressedSize: number;
  /** Byte offset of the member's data. */
  dataStart: number;
}

const EOCD = 0x06054b50;
const ZIP64_LOCATOR = 0x07064b50;
const ZIP64_EOCD = 0x06064b50;
const CENTRAL = 0x02014b50;
const LOCAL = 0x04034b50;

function readAt(fd: number, offset: number, length: number): DataView {
  const bytes = new Uint8Array(length);
  const got = fs.readSync(fd, bytes, 0, length, offset);
  return new DataView(bytes.buffer, 0, got);
}

function u64(view: DataView, at: number): number {
  const value = view.getBigUint64(at, true);
  return value > BigInt(Number.MAX_SAFE_INTEGER) ? Number.NaN : Number(value);
}

/** Every member of the zip file on `fd`, or a DataError naming what is wrong. */
export function zipDirectory(fd: number, size: number, label: string): ZipMember[] {
  const damaged = (what: string) => new DataError(`${label}: not a readable .npz (zip) file: ${what}; expected a file written by numpy.savez or numpy.savez_compressed`);
  // The end record is 22 bytes plus a comment of at most 65535 bytes, at the very end.
  const tailLength = Math.min(size, 22 + 0xffff);
  const tail = readAt(fd, size - tailLength, tailLength);
  let end = -1;
  for (let i = tail.byteLength - 22; i >= 0; i--) {
    if (tail.getUint32(i, true) === EOCD) {
      end = i;
      break;
    }
  }
  if (end < 0) throw damaged("no end-of-directory record (the file is truncated, or not a zip file)");
  let entries = tail.getUint16(end + 10, true);
  let directorySize = tail.getUint32(end + 12, true);
  let directoryOffset = tail.getUint32(end + 16, true);
  if (entries === 0xffff || directorySize === 0xffffffff || directoryOffset === 0xffffffff) {
    const locatorAt = end - 20;
    if (locatorAt < 0 || tail.getUint32(locatorAt, true) !== ZIP64_LOCATOR) throw damaged("a Zip64 directory without its locator");
    const zip64At = u64(tail, locatorAt + 8);
    const record = readAt(fd, zip64At, 56);
    if (record.byteLength < 56 || record.getUint32(0, true) !== ZIP64_EOCD) throw damaged("the Zip64 end-of-directory record is missing");
    entries = u64(record, 32);
    directorySize = u64(record, 40);
    directoryOffset = u64(record, 48);
  }
  if (!(directoryOffset + directorySize <= size)) throw damaged(`the directory lies beyond the end of the file (${size} bytes; is it truncated?)`);
  const directory = readAt(fd, directoryOffset, directorySize);
  const members: ZipMember[] = [];
  let at = 0;
  for (let e = 0; e < entries; e++) {
    if (at + 46 > directory.byteLength || directory.getUint32(at, true) !== CENTRAL) throw damaged(`directory entry ${e + 1} is damaged`);
    const flags = directory.getUint16(at + 8, true);
    const method = directory.getUint16(at + 10, true);
    const crc = directory.getUint32(at + 16, true);
    let compressedSize = directory.getUint32(at + 20, true);
    let uncompressedSize = directory.getUint32(at + 24, true);
    const nameLength = directory.getUint16(at + 28, true);
    const extraLength = directory.getUint16(at + 30, true);
    const commentLength = directory.getUint16(at + 32, true);
    let localOffset = directory.getUint32(at + 42, true);
    const nameBytes = new Uint8Array(directory.buffer, directory.byteOffset + at + 46, nameLength);
    const name = new TextDecoder(flags & 0x800 ? "utf-8" : "latin1").decode(nameBytes);
    // Zip64 extended information (4.5.3): the fields that hold 0xFFFFFFFF, in this order.
    let extra = at + 46 + nameLength;
    const extraEnd = extra + extraLength;
    while (extra + 4 <= extraEnd) {
      const id = directory.getUint16(extra, true);
      const length = directory.getUint16(extra + 2, true);
      if (id === 0x0001) {
        let field = extra + 4;
        if (uncompressedSize === 0xffffffff) (uncompressedSize = u64(directory, field)), (field += 8);
        if (compressedSize === 0xffffffff) (compressedSize = u64(directory, field)), (field += 8);
        if (localOffset === 0xffffffff) localOffset = u64(directory, field);
      }
      extra += 4 + length;
    }
    if (flags & 1) throw new DataError(`${label}: member "${name}" is encrypted; save the arrays with numpy.savez, which does not encrypt`);
    const local = readAt(fd, localOffset, 30);
    if (local.byteLength < 30 || local.getUint32(0, true) !== LOCAL) throw damaged(`member "${name}" has no local header where the directory says`);
    const dataStart = localOffset + 30 + local.getUint16(26, true) + local.getUint16(28, true);
    if (!(dataStart + compressedSize <= size)) throw damaged(`member "${name}" runs past the end of the file (is it truncated?)`);
    members.push({ name, method, crc32: crc, compressedSize, uncompressedSize, dataStart });
    at += 46 + nameLength + extraLength + commentLength;
  }
  return members;
}
