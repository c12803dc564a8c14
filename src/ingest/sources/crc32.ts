/**
 * CRC-32 as zip files record it (PKWARE APPNOTE.TXT 4.4.7; the reflected polynomial
 * 0xEDB88320 of ISO 3309 / ITU-T V.42), updated piece by piece. The table-driven form
 * is Sarwate's (Commun. ACM 31, 1008 (1988)).
 */
const TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

/** The CRC of `bytes` continued from `crc` (0 to start). */
export function crc32(bytes: Uint8Array, crc = 0): number {
  let c = ~crc >>> 0;
  for (let i = 0; i < bytes.length; i++) c = TABLE[(c ^ bytes[i]) & 0xff] ^ (c >>> 8);
  return ~c >>> 0;
}
