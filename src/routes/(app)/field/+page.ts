export async function load({ parent }) {
	const { me } = await parent();
	return { me };
}
