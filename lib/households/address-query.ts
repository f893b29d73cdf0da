import { normaliseStreet, normaliseText } from './normalise';

/**
 * A typed address split into what the register's search matches on: the street words (normalised, so
 * "str." is "street"), the house number with its suffix, and a postcode when one is given. Whatever else is
 * left (a locality after a comma) is kept as `locality`. Pure: the search itself is in db/address-search.ts.
 *
 * `parseAddressQuery('Mill Str. 12a, 40210 Quillhaven')` →
 * `{ street: 'mill street', number: { base: 12, suffix: 'a' }, postcode: '40210', locality: 'quillhaven' }`
 */
export interface AddressQuery {
  street: string;
  number: { base: number; suffix: string } | null;
  postcode: string | null;
  locality: string;
}

// a postcode: five digits (DE, FR, US…), four digits after a comma (NL, AT, CH…), or the UK/IE shape
const UK_POSTCODE = /\b([a-z]{1,2}\d[a-z\d]?)\s*(\d[a-z]{2})\b/i;

export function parseAddressQuery(text: string): AddressQuery {
  const parts = text.split(/[,;]/).map((p) => p.trim()).filter(Boolean);
  let postcode: string | null = null;
  let number: AddressQuery['number'] = null;
  const streetWords: string[] = [];
  const localityWords: string[] = [];
  parts.forEach((part, i) => {
    let rest = part;
    const uk = UK_POSTCODE.exec(rest);
    if (uk && i > 0) {
      postcode = `${uk[1]}${uk[2]}`.toLowerCase();
      rest = rest.replace(uk[0], ' ');
    }
    const words = normaliseText(rest).split(' ').filter(Boolean);
    // "12 a" (a lone letter after a number) is one house number
    for (let k = 0; k < words.length; k++) {
      const w = words[k];
      const num = /^(\d{1,4})([a-z]{0,2})$/.exec(w);
      if (/^\d{5}$/.test(w) || (i > 0 && /^\d{4}$/.test(w) && number !== null)) {
        postcode ??= w;
        continue;
      }
      if (num && number === null && i === 0) {
        let suffix = num[2];
        if (!suffix && /^[a-z]$/.test(words[k + 1] ?? '')) suffix = words[++k];
        number = { base: Number(num[1]), suffix };
        continue;
      }
      if (/^\d+$/.test(w) && postcode === null && i > 0) {
        postcode = w;
        continue;
      }
      (i === 0 ? streetWords : localityWords).push(w);
    }
  });
  return { street: normaliseStreet(streetWords.join(' ')), number, postcode, locality: localityWords.join(' ') };
}

/**
 * A candidate's score, 0..1: the street's trigram similarity counts most, then how well the number fits
 * (exact with suffix 1, same base 0.8, nearer numbers less), and a matching postcode adds a little.
 */
export function addressScore(streetSimilarity: number, q: AddressQuery, a: { numberBase: number | null; numberSuffix: string; postcode: string }): number {
  let numberFit = 0.5;
  if (q.number) {
    if (a.numberBase === q.number.base) numberFit = a.numberSuffix === q.number.suffix ? 1 : 0.8;
    else if (a.numberBase !== null) numberFit = 0.6 / (1 + Math.abs(a.numberBase - q.number.base));
    else numberFit = 0;
  }
  const postcodeFit = q.postcode && a.postcode ? (normaliseText(a.postcode).replace(/\s/g, '') === q.postcode ? 1 : 0) : 0.5;
  return Math.round((0.6 * streetSimilarity + 0.3 * numberFit + 0.1 * postcodeFit) * 1000) / 1000;
}
