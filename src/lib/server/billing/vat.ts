// VAT on Airtally's prices (pure, no I/O). Our plan prices are VAT-inclusive: what the payment provider charges is
// the gross amount, and the invoice list splits it into net and VAT.
//
// Source: HMRC, "VAT rates" (https://www.gov.uk/guidance/rates-of-vat-on-different-goods-and-services) — the
// standard rate is 20 %. The VAT in a VAT-inclusive price is its "VAT fraction", 1/6 at 20 % (HMRC, "VAT guide
// (VAT Notice 700)", https://www.gov.uk/guidance/vat-guide-notice-700, VAT fraction: rate ÷ (100 + rate)).

/** The UK standard rate of VAT, in per cent (HMRC, VAT rates). */
export const UK_STANDARD_VAT_RATE_PCT = 20;

/** A VAT-inclusive amount split into net and VAT, all in pence. */
export interface VatSplit {
  netPence: number;
  vatPence: number;
  grossPence: number;
  ratePct: number;
}

/**
 * Splits a VAT-inclusive amount: VAT = gross × rate ÷ (100 + rate), rounded to the penny; net = gross − VAT, so
 * net + VAT is always the amount charged. Credits (negative amounts) split the same way.
 */
export function splitVatInclusive(grossPence: number, ratePct = UK_STANDARD_VAT_RATE_PCT): VatSplit {
  if (!Number.isInteger(grossPence)) throw new RangeError('Amounts are whole pence.');
  const vatPence = Math.round((grossPence * ratePct) / (100 + ratePct));
  return { netPence: grossPence - vatPence, vatPence, grossPence, ratePct };
}
