/**
 * Bytes → string for the text formats (GPX, KML, GeoJSON, CSV).
 *
 * Order of evidence: a byte-order mark wins; then an XML declaration's `encoding` (read through
 * latin1, which is safe because the declaration itself is ASCII); then strict UTF-8; and when the
 * bytes are not valid UTF-8, windows-1252, the usual encoding of legacy survey exports, so names
 * keep their "ß" and "°" instead of turning into U+FFFD.
 */

const XML_DECL_ENCODING = /^<\?xml[^>]*?\sencoding\s*=\s*["']([A-Za-z0-9._-]+)["']/;

/** Encodings we honour from an XML declaration, mapped to their WHATWG TextDecoder labels. */
const DECLARED: Record<string, string> = {
  'utf-8': 'utf-8',
  utf8: 'utf-8',
  'us-ascii': 'utf-8',
  ascii: 'utf-8',
  'iso-8859-1': 'windows-1252',
  'iso8859-1': 'windows-1252',
  latin1: 'windows-1252',
  'latin-1': 'windows-1252',
  'windows-1252': 'windows-1252',
  cp1252: 'windows-1252',
  'iso-8859-15': 'iso-8859-15',
};

// windows-1252's 0x80–0x9F (undefined bytes map to themselves, as WHATWG says). Node's
// TextDecoder('windows-1252') decodes these as ISO-8859-1 C1 controls, so they are mapped here.
const CP1252_HIGH = '€\u0081‚ƒ„…†‡ˆ‰Š‹Œ\u008dŽ\u008f\u0090‘’“”•–—˜™š›œ\u009džŸ';

function decodeWindows1252(bytes: Uint8Array): string {
  const latin1 = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length).toString('latin1');
  return latin1.replace(/[\u0080-\u009f]/g, (c) => CP1252_HIGH[c.charCodeAt(0) - 0x80]);
}

/**
 * Decode an uploaded text file.
 *
 * @example
 * decodeText(Buffer.from([0xef, 0xbb, 0xbf, 0x61])) // 'a' (BOM stripped)
 * decodeText(Buffer.from('<?xml version="1.0" encoding="ISO-8859-1"?><a>\xe9</a>', 'latin1')) // '…<a>é</a>'
 */
export function decodeText(bytes: Uint8Array): string {
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
    return new TextDecoder('utf-8').decode(bytes.subarray(3));
  }
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    return new TextDecoder('utf-16le').decode(bytes.subarray(2));
  }
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    return new TextDecoder('utf-16be').decode(bytes.subarray(2));
  }
  // "<?" in UTF-16 without a BOM (XML 1.0 appendix F): rare, but cheap to recognise
  if (bytes.length >= 4 && bytes[0] === 0x3c && bytes[1] === 0 && bytes[2] === 0x3f && bytes[3] === 0) {
    return new TextDecoder('utf-16le').decode(bytes);
  }
  if (bytes.length >= 4 && bytes[0] === 0 && bytes[1] === 0x3c && bytes[2] === 0 && bytes[3] === 0x3f) {
    return new TextDecoder('utf-16be').decode(bytes);
  }
  const head = Buffer.from(bytes.buffer, bytes.byteOffset, Math.min(bytes.length, 200)).toString('latin1');
  const declared = XML_DECL_ENCODING.exec(head)?.[1]?.toLowerCase();
  const label = declared ? DECLARED[declared] : undefined;
  if (label === 'windows-1252') return decodeWindows1252(bytes);
  if (label && label !== 'utf-8') return new TextDecoder(label).decode(bytes);
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return decodeWindows1252(bytes);
  }
}
