/** The table is fetched from /api/vehicles in the browser. */
export const load = () => ({ title: 'Vehicles' });
