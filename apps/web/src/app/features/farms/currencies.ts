/** A currency to choose: its ISO 4217 code and its name in words. */
export interface CurrencyChoice {
  code: string;
  name: string;
}

/** Codes most egg farms count in, offered first (common practice; any other ISO 4217 code follows). */
const FIRST = ['USD', 'EUR', 'GBP', 'CAD', 'AUD', 'MXN', 'BRL'];

/**
 * Every currency this browser knows, named in English, the usual ones first; `current` is kept even if the
 * browser does not list it, so a farm's setting is never lost by opening the dialog.
 */
export function currencyChoices(current: string): CurrencyChoice[] {
  const names = new Intl.DisplayNames(['en'], { type: 'currency' });
  const all = Intl.supportedValuesOf('currency');
  const codes = [...FIRST, ...all.filter((c) => !FIRST.includes(c))];
  if (!codes.includes(current)) codes.unshift(current);
  return codes.map((code) => ({ code, name: names.of(code) ?? code }));
}
