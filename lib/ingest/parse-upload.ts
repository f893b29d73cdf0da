import { detectFormat, type UploadFile } from './detect-format';
import { parseGeoJson } from './parse-geojson';
import { parseGpx } from './parse-gpx';
import { parseKml, parseKmz } from './parse-kml';
import { parseShapefile, parseZippedShapefile } from './parse-shapefile';
import { parseSurveyCsv } from './parse-survey-csv';
import { assertFeaturesInRange } from './validate-coords';
import { IngestError, type ParseOptions, type ParsedUpload } from './types';

/**
 * Parse an upload, whatever its format, into WGS 84 features.
 *
 * Detects the format from the content, dispatches to its parser, then checks what every format
 * must satisfy: finite positions within range, lines of ≥ 2 positions, at least one feature.
 * Throws IngestError with a code the API maps to an HTTP status.
 *
 * @example
 * const upload = await parseUpload([{ name: 'walk.gpx', bytes }], { resolveCrs, limits: { maxInflatedBytes: 200e6, maxZipEntries: 1000 } });
 * upload.format; // 'gpx'
 */
export async function parseUpload(files: UploadFile[], opts: ParseOptions): Promise<ParsedUpload> {
  const detected = detectFormat(files);
  let upload: ParsedUpload;
  if (detected.container === 'loose') upload = await parseShapefile(detected.files, opts);
  else if (detected.container === 'zip') {
    upload = detected.format === 'kmz' ? await parseKmz(detected.file.bytes, opts.limits) : await parseZippedShapefile(detected.file.bytes, opts);
  } else {
    switch (detected.format) {
      case 'gpx':
        upload = parseGpx(detected.text);
        break;
      case 'kml':
        upload = parseKml(detected.text);
        break;
      case 'geojson':
        upload = await parseGeoJson(detected.text, opts);
        break;
      case 'csv':
        upload = await parseSurveyCsv(detected.text, opts);
        break;
    }
  }
  // the parsers check as they go; this is the contract's backstop, the same for every format
  assertFeaturesInRange(upload.features, upload.format !== 'gpx');
  for (const f of upload.features) {
    if (f.kind === 'line' && f.coords.length < 2) throw new IngestError('too_few_points', `line '${f.name ?? '?'}' has fewer than 2 positions`);
  }
  if (upload.features.length === 0) {
    const why = upload.warnings.length ? ` (${upload.warnings.join('; ')})` : '';
    throw new IngestError('too_few_points', `the file holds no usable line or point${why}`);
  }
  return upload;
}
