import { describe, expect, it } from 'vitest';
import { splitVatInclusive, UK_STANDARD_VAT_RATE_PCT } from '../../src/lib/server/billing/vat';

// Source: HMRC, "VAT rates" (https://www.gov.uk/guidance/rates-of-vat-on-different-goods-and-services): standard
// rate 20 %. HMRC, "VAT guide (VAT Notice 700)": the VAT in a VAT-inclusive price is the VAT fraction, 1/6 at 20 %.
describe('VAT on VAT-inclusive prices', () => {
  it('uses the UK standard rate of 20 %', () => {
    expect(UK_STANDARD_VAT_RATE_PCT).toBe(20);
  });

  it('takes 1/6 of a VAT-inclusive price as VAT: £24.00 is £20.00 + £4.00 VAT, £240.00 is £200.00 + £40.00', () => {
    expect(splitVatInclusive(2400)).toEqual({ netPence: 2000, vatPence: 400, grossPence: 2400, ratePct: 20 });
    expect(splitVatInclusive(24000)).toEqual({ netPence: 20000, vatPence: 4000, grossPence: 24000, ratePct: 20 });
  });

  it('rounds VAT to the penny and keeps net + VAT = the amount charged', () => {
    // £10.00 × 1/6 = £1.666… → £1.67 VAT, £8.33 net.
    expect(splitVatInclusive(1000)).toMatchObject({ netPence: 833, vatPence: 167 });
    for (const gross of [1, 7, 999, 4567, 123457]) {
      const split = splitVatInclusive(gross);
      expect(split.netPence + split.vatPence).toBe(gross);
    }
  });

  it('splits a credit the same way', () => {
    expect(splitVatInclusive(-1200)).toMatchObject({ netPence: -1000, vatPence: -200 });
  });

  it('refuses fractions of a penny', () => {
    expect(() => splitVatInclusive(10.5)).toThrow(RangeError);
  });
});
