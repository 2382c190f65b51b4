/**
 * Strict decimal number parsing straight from bytes.
 * Grammar: [+-]? (digits [. digits*] | . digits) ([eE] [+-]? digits)?
 * Anything else (thousands separators, `1,5`, `12abc`, hex, `Infinity`) is rejected.
 */
const POW10 = [
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];
const latin1 = new TextDecoder('latin1');

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Whether text (a cell already decoded) is a number by the grammar above. */
export function isNumberText(text: string): boolean {
  return NUMBER_TEXT.test(text);
}

/** Returns the value, or NaN when the bytes are not a number by the grammar above. */
export function parseNumberBytes(b: Uint8Array, start: number, end: number): number {
  let i = start;
  if (i >= end) return NaN;
  let negative = false;
  if (b[i] === 0x2d || b[i] === 0x2b) {
    negative = b[i] === 0x2d;
    i++;
  }
  let mantissa = 0;
  let digits = 0; // significant digits accumulated into mantissa
  let intDigits = 0;
  let fracDigits = 0;
  let scale = 0; // power of ten to apply to mantissa
  let exact = true;
  while (i < end && b[i] >= 0x30 && b[i] <= 0x39) {
    if (digits < 15) {
      mantissa = mantissa * 10 + (b[i] - 0x30);
      if (mantissa > 0) digits++;
    } else {
      exact = false;
    }
    intDigits++;
    i++;
  }
  if (i < end && b[i] === 0x2e) {
    i++;
    while (i < end && b[i] >= 0x30 && b[i] <= 0x39) {
      if (digits < 15) {
        mantissa = mantissa * 10 + (b[i] - 0x30);
        if (mantissa > 0) digits++;
        scale--;
      } else exact = false;
      fracDigits++;
      i++;
    }
  }
  if (intDigits + fracDigits === 0) return NaN;
  if (i < end && (b[i] === 0x65 || b[i] === 0x45)) {
    i++;
    let expNegative = false;
    if (i < end && (b[i] === 0x2d || b[i] === 0x2b)) {
      expNegative = b[i] === 0x2d;
      i++;
    }
    let exp = 0;
    let expDigits = 0;
    while (i < end && b[i] >= 0x30 && b[i] <= 0x39) {
      if (exp < 100000) exp = exp * 10 + (b[i] - 0x30);
      expDigits++;
      i++;
    }
    if (expDigits === 0) return NaN;
    scale += expNegative ? -exp : exp;
  }
  if (i !== end) return NaN;
  // Fast path (exact by Clinger's argument): mantissa < 2^53 and |scale| <= 22.
  if (exact && scale >= -22 && scale <= 22) {
    const v = scale >= 0 ? mantissa * POW10[scale] : mantissa / POW10[-scale];
    return negative ? -v : v;
  }
  return Number(latin1.decode(b.subarray(start, end)));
}
