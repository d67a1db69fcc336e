const IDENTIFIERS: Record<string, string> = {
  wavelengthNm: 'the wavelength',
  periodNm: 'the period',
  coneHalfAngleDeg: 'the cone half-angle β',
  numericalAperture: 'sin β',
};

/** A schema message rephrased for the field it is shown at (the field's label already names the quantity). */
export function friendlyMessage(path: string, message: string): string {
  if (/expected (number|nan)|received (nan|undefined)/i.test(message) && !/object/i.test(message)) return 'Enter a number';
  if (/expected int/i.test(message)) return 'Enter a whole number';
  const generic = /invalid input|expected|required/i.test(message);
  if (generic && /phaseMap(\.(source|id))?$/.test(path)) return 'Choose an uploaded phase map';
  if (generic && /image(\.(source|id|name))?$/.test(path)) return 'Choose a target picture';
  if (message.startsWith('give exactly one of')) return 'Give either the cone half-angle β or sin β';
  let text = message.replace(/^[^]*?\bmust\b/, 'Must');
  for (const [identifier, words] of Object.entries(IDENTIFIERS)) text = text.replaceAll(identifier, words);
  text = text.replace(/^Too small: expected number to be >=(.*)$/, 'Must be at least$1');
  text = text.replace(/^Too big: expected number to be <=(.*)$/, 'Must be at most$1');
  return text.charAt(0).toUpperCase() + text.slice(1);
}
