// Card numbers the fake's hosted pages accept. Test numbers follow the provider's published test
// cards (common practice in its docs): 4242… and 5555… succeed, 4000…0002 and 4000…9995 are declined.
// 4000…0341 is accepted when entered and declines every later charge, so a renewal can fail.

export interface CardEntry {
  number: string;
  expiry: string;
  cvc: string;
}

export type CardCheck =
  | { ok: true; brand: 'visa' | 'mastercard'; last4: string; expMonth: number; expYear: number; laterChargesDecline: boolean }
  | { ok: false; code: string; declineCode: string | null; message: string; field: 'number' | 'expiry' | 'cvc' };

const TEST_CARDS: Record<string, { brand: 'visa' | 'mastercard'; decline?: { code: string; message: string }; laterChargesDecline?: boolean }> = {
  '4242424242424242': { brand: 'visa' },
  '5555555555554444': { brand: 'mastercard' },
  '4000000000000002': { brand: 'visa', decline: { code: 'generic_decline', message: 'Your card was declined.' } },
  '4000000000009995': { brand: 'visa', decline: { code: 'insufficient_funds', message: 'Your card has insufficient funds.' } },
  '4000000000000341': { brand: 'visa', laterChargesDecline: true },
};

/** The Luhn check digit test every card number passes. */
function passesLuhn(digits: string): boolean {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i]);
    if (i % 2 === 1) {
      d *= 2;
      if (d > 9) d -= 9;
    }
    sum += d;
  }
  return sum % 10 === 0;
}

export function checkCard(entry: CardEntry, now: Date): CardCheck {
  const digits = entry.number.replace(/[\s-]/g, '');
  if (!/^\d{12,19}$/.test(digits) || !passesLuhn(digits)) {
    return { ok: false, code: 'incorrect_number', declineCode: null, message: 'Your card number is incorrect.', field: 'number' };
  }
  const expiry = /^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/.exec(entry.expiry);
  const month = expiry ? Number(expiry[1]) : 0;
  const year = expiry ? (expiry[2]!.length === 2 ? 2000 + Number(expiry[2]) : Number(expiry[2])) : 0;
  if (!expiry || month < 1 || month > 12) {
    return { ok: false, code: 'invalid_expiry_month', declineCode: null, message: "Your card's expiration date is incomplete.", field: 'expiry' };
  }
  if (year < now.getUTCFullYear() || (year === now.getUTCFullYear() && month < now.getUTCMonth() + 1)) {
    return { ok: false, code: 'expired_card', declineCode: null, message: 'Your card has expired.', field: 'expiry' };
  }
  if (!/^\d{3,4}$/.test(entry.cvc.trim())) {
    return { ok: false, code: 'incorrect_cvc', declineCode: null, message: "Your card's security code is incomplete.", field: 'cvc' };
  }
  const card = TEST_CARDS[digits];
  if (!card) {
    return { ok: false, code: 'card_declined', declineCode: 'test_mode_live_card', message: 'Your card was declined. This is a test page: use a test card number.', field: 'number' };
  }
  if (card.decline) return { ok: false, code: 'card_declined', declineCode: card.decline.code, message: card.decline.message, field: 'number' };
  return { ok: true, brand: card.brand, last4: digits.slice(-4), expMonth: month, expYear: year, laterChargesDecline: card.laterChargesDecline ?? false };
}
