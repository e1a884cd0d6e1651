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
		serviceWorker: { register: false },
		// Cross-site posts are refused in hooks.server.ts (request-rules.ts) for every body type
		// and with the API's error body; SvelteKit's own check (form bodies only) steps aside.
		csrf: { trustedOrigins: ['*'] },
		// OWASP ASVS 5.0 §3.4.3, §3.4.6: a nonce per rendered page, hashes in the prerendered
		// shell. Style attributes are allowed (the keypad and gauge place themselves with them;
		// a style attribute cannot run script); style and script elements are not.
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				'style-src': ['self'],
				'style-src-attr': ['unsafe-inline'],
				// blob: for the photos kept on the phone (shown from IndexedDB with no signal).
				'img-src': ['self', 'data:', 'blob:'],
				'font-src': ['self'],
				'connect-src': ['self'],
				'manifest-src': ['self'],
				'worker-src': ['self'],
				'object-src': ['none'],
				'base-uri': ['none'],
				'form-action': ['self'],
				'frame-ancestors': ['none']
			}
		}
	}
};

export default config;
