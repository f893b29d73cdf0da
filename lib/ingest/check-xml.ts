import { IngestError } from './types';

const DTD = /<!(DOCTYPE|ENTITY)/i;

/**
 * Refuse XML that carries a document type declaration or an entity declaration.
 *
 * GPX and KML never need a DTD, and refusing it outright is the only way to be sure that no entity
 * is ever expanded (billion laughs) and no external entity is ever fetched (XXE), whatever the XML
 * parser underneath does. Run on the decoded text, so UTF-16 input cannot hide the markup.
 *
 * @example
 * assertSafeXml('<gpx/>'); // passes
 * assertSafeXml('<!DOCTYPE x [<!ENTITY a "b">]><x/>'); // throws IngestError('unsafe_xml')
 */
export function assertSafeXml(text: string): void {
  const m = DTD.exec(text);
  if (!m) return;
  const before = text.slice(0, m.index);
  const line = before.split('\n').length;
  const column = m.index - before.lastIndexOf('\n');
  throw new IngestError(
    'unsafe_xml',
    `the file contains <!${m[1].toUpperCase()} at line ${line}, column ${column}; document type and entity declarations are refused for safety. Export the file again without a DOCTYPE`,
    { line, column },
  );
}
