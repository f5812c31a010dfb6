/**
 * LOINC codes: up to seven digits, a hyphen and a Mod 10 check digit (e.g. 2345-7).
 * @see LOINC Users' Guide, section 12 C "Calculating Mod 10 Check Digits" (Regenstrief Institute,
 *   2023): the eight-step algorithm with the worked example 12345 → 5.
 */

/**
 * The Mod 10 check digit of the digits before the hyphen: from the right, the digits in odd
 * positions are doubled (as one number), the even-position digits are put in front, all digits of
 * that are added, and the check digit brings the sum up to the next multiple of ten.
 * Throws on anything but digits.
 * @example loincCheckDigit("12345") // 5
 */
export function loincCheckDigit(digits: string): number {
  if (!/^[0-9]+$/.test(digits)) throw new Error(`A LOINC number is made of digits; got "${digits}".`);
  const fromRight = [...digits].reverse().map(Number);
  // Read right to left as the guide does: 12345 gives 531 and 42.
  const odd = fromRight.filter((_, i) => i % 2 === 0).join("");
  const even = fromRight.filter((_, i) => i % 2 === 1).join("");
  const doubled = String(Number(odd) * 2);
  const sum = [...(even + doubled)].reduce((total, d) => total + Number(d), 0);
  return (10 - (sum % 10)) % 10;
}

/**
 * Null when `code` is a well-formed LOINC code whose check digit is right; otherwise a message
 * that says what is wrong. (Fourteen deprecated codes carry wrong check digits by LOINC's own
 * admission; they are refused too, as a laboratory should not adopt a deprecated code.)
 */
export function loincProblem(code: string): string | null {
  const match = /^([0-9]{1,7})-([0-9])$/.exec(code);
  if (!match) return `"${code}" is not a LOINC code: write the number, a hyphen and the check digit, e.g. 2345-7.`;
  const expected = loincCheckDigit(match[1]);
  if (Number(match[2]) !== expected) {
    return `The check digit of LOINC code ${code} is wrong: for ${match[1]} it is ${expected}. Check the code against the LOINC database.`;
  }
  return null;
}
