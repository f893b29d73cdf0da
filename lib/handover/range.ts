// One HTTP byte range (RFC 9110 §14.1.2): "bytes=a-b", "bytes=a-" or "bytes=-n". Several ranges, or a form we
// do not read, are ignored (null: the whole file, as §14.2 allows); a range outside the file is unsatisfiable.
export function parseRange(header: string, size: number): { start: number; end: number } | 'unsatisfiable' | null {
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!m || (m[1] === '' && m[2] === '')) return null;
  if (m[1] === '') {
    const n = Number(m[2]);
    if (n === 0 || size === 0) return 'unsatisfiable';
    return { start: Math.max(0, size - n), end: size - 1 };
  }
  const start = Number(m[1]);
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1);
  if (start >= size || (m[2] !== '' && Number(m[2]) < start)) return 'unsatisfiable';
  return { start, end };
}
