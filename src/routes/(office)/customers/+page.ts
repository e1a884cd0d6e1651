/** The table is fetched from /api/customers in the browser. */
export const load = () => ({ title: 'Customers' });
