import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

// One build id per build process: the client and the server environments each load this
// config, and a timestamp taken twice would differ and break hydration.
process.env.FIELDBENCH_BUILD_ID ??= String(Date.now());

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter({ out: 'build' }),
		paths: { relative: false },
		version: { name: process.env.FIELDBENCH_BUILD_ID },
		serviceWorker: { register: false }
	}
};

export default config;
