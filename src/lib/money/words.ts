/** The words of payments on every screen (states, what for, how paid). */
export const PAYMENT_WORDS = {
	state: {
		pending: 'Waiting for the customer',
		paid: 'Paid',
		failed: 'Card declined',
		refunded: 'Refunded',
		expired: 'Payment page closed unpaid'
	},
	purpose: { quote: 'Quote', diagnostic: 'Diagnostic fee' },
	method: { card: 'Card', cash: 'Cash', transfer: 'Bank transfer' }
} as const;
