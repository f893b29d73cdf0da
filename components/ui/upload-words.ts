// The words the upload screens use for counts and refusals: a surveyor's words, not the API's.

/** A count with its noun: `plural(1, "point") === "1 point"`, `plural(1200, "point") === "1,200 points"`. */
export const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;

export const storedMessage = (u: { featureCount: number; pointCount: number }) =>
  `Read ${plural(u.featureCount, 'line or point', 'lines and points')} (${plural(u.pointCount, 'position')} in all).`;

// refusals a different coordinate system can cure: the form offers to read the stored file again
export const RETRYABLE = new Set(['crs_required', 'unknown_crs', 'swapped_axes', 'out_of_range']);

/**
 * The refusal in a surveyor's words; the server's own message (which says where in the file) follows it
 * where it adds something.
 */
export function explainRefusal(code: string | undefined, serverMessage: string, projectCrs: string): { text: string; detail?: string } {
  const grid = `This project usually works in ${projectCrs}.`;
  switch (code) {
    case 'crs_required':
      // the server's words here are for API clients ("send the EPSG code in the crs field"): left out
      return { text: `The file does not say which coordinate system its coordinates are in. Enter the EPSG number of the grid they were measured in and read it again. ${grid}` };
    case 'unknown_crs':
      return { text: `That EPSG number is not in the list of coordinate systems. Check it (for example 25832 is ETRS89 / UTM zone 32N) and read the file again.`, detail: serverMessage };
    case 'swapped_axes':
      return { text: 'The coordinates look swapped: latitude for longitude, or easting for northing. Check the columns or the coordinate system, then read it again.', detail: serverMessage };
    case 'out_of_range':
      return { text: 'Some positions fall outside the world (latitude beyond ±90° or longitude beyond ±180°): the coordinate system or the columns are probably wrong.', detail: serverMessage };
    case 'too_few_points':
      return { text: 'No line in the file has the two points a line needs.' };
    case 'empty_file':
      return { text: 'The file is empty.' };
    case 'unknown_format':
    case 'unsupported_format':
      return { text: 'Trenchbook cannot read this kind of file. It reads GPX, KML and KMZ, shapefiles (zipped or as loose parts), GeoJSON and survey CSV.', detail: serverMessage };
    case 'missing_parts':
      return { text: 'A shapefile needs its .shp, .shx and .dbf parts together: add the missing ones, or upload them zipped.', detail: serverMessage };
    case 'malformed':
      return { text: 'The file is damaged, incomplete or has rows that cannot be read.', detail: serverMessage };
    case 'unsafe_xml':
    case 'unsafe_zip':
    case 'zip_limits':
      return { text: 'The file was refused for safety: it contains something a survey file never needs.', detail: serverMessage };
    case 'too_large':
      return { text: 'The file is larger than the upload limit.', detail: serverMessage };
    default:
      return { text: serverMessage };
  }
}


/** A parser's warning in a surveyor's words where it speaks to API clients; others are plain already. */
export function warningWords(w: string): string {
  if (w.startsWith('columns were guessed from the header')) return 'Columns recognised from the header.';
  const mapping = /^attribute mapping guessed from the names present: (\{.*\}); send mapping to set it$/.exec(w);
  if (mapping) {
    const names: Record<string, string> = { ref: 'route reference', street: 'street', ducts: 'planned ducts', kind: 'street route or road crossing' };
    let found: Record<string, string> = {};
    try {
      found = JSON.parse(mapping[1]) as Record<string, string>;
    } catch {
      // the server wrote it; fall through to the plain list
    }
    const list = Object.entries(found).map(([k, col]) => `${names[k] ?? k} from “${col}”`);
    return list.length ? `Attributes recognised from the file's field names: ${list.join(', ')}. Name the fields above to choose others.` : 'No attribute names were recognised; name the fields above.';
  }
  const crs = /^the file's crs member says (EPSG:\d+); (EPSG:\d+) from the request was used$/.exec(w);
  if (crs) return `The file says ${crs[1]}; ${crs[2]}, chosen on the form, was used.`;
  return w[0].toUpperCase() + w.slice(1) + (/[.!?]$/.test(w) ? '' : '.');
}
