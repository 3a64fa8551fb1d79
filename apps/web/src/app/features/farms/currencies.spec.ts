import { CurrencyPipe } from '@angular/common';
import { currencyChoices } from './currencies';

/** Money as the farm summary shows it: Angular's currency pipe, in the app's locale. */
const formatMoney = (value: number, currency: string) =>
  new CurrencyPipe('en-US').transform(value, currency);

describe('currencies', () => {
  it('offers the usual currencies first, then every other ISO 4217 code, named in words', () => {
    const choices = currencyChoices('USD');
    expect(choices.slice(0, 3).map((c) => c.code)).toEqual(['USD', 'EUR', 'GBP']);
    // ISO 4217 names (the standard's list, via the browser's Intl data).
    expect(choices.find((c) => c.code === 'EUR')?.name).toBe('Euro');
    expect(choices.find((c) => c.code === 'JPY')?.name).toBe('Japanese Yen');
    expect(new Set(choices.map((c) => c.code)).size).toBe(choices.length);
  });

  it("keeps a farm's current code even when the browser does not list it", () => {
    expect(currencyChoices('XTS')[0]?.code).toBe('XTS');
  });

  it('formats money with its currency sign and the currency’s decimals', () => {
    expect(formatMoney(1234.5, 'USD')).toBe('$1,234.50');
    expect(formatMoney(12, 'EUR')).toBe('€12.00');
    // The yen has no minor unit (ISO 4217: 0 decimals).
    expect(formatMoney(1234, 'JPY')).toBe('¥1,234');
  });
});
