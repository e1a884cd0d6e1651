import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { SvelteKitPWA } from '@vite-pwa/sveltekit';
import { defineConfig } from 'vitest/config';
import { readPalette } from './scripts/lib/palette.js';

// The installed app's colours are the palette's (src/app.css): paper behind the splash, ink bar.
const palette = readPalette();

export default defineConfig({
	build: {
		// No report of which plugins took how long on a slow machine: the first `npm start`
		// builds, and its output should end with the one address to open.
		rolldownOptions: { checks: { bundlerTimings: false } }
	},
	plugins: [
		tailwindcss(),
		sveltekit(),
		SvelteKitPWA({
			strategies: 'generateSW',
			registerType: 'prompt',
			injectRegister: false,
			manifest: {
				name: 'Fieldbench',
				short_name: 'Fieldbench',
				description: 'Log electrical component tests on a phone, offline, and sync them to the workshop.',
				start_url: '/field',
				scope: '/',
				display: 'standalone',
				orientation: 'portrait',
				background_color: palette.paper,
				theme_color: palette.ink,
				// Made by scripts/make-icons.ts.
				icons: [
					{ src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
					{ src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
					{ src: '/icons/maskable-192.png', sizes: '192x192', type: 'image/png', purpose: 'maskable' },
					{ src: '/icons/maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' }
				]
			},
			workbox: {
				globPatterns: [
					'client/**/*.{js,css,ico,png,svg,webp,webmanifest,woff,woff2}',
					'prerendered/**/*.{html,json}'
				],
				// Page loads go to the network (so the server's guards and status codes apply);
				// with no signal, or no answer within 4 s, they get the app shell, and the client
				// router renders the (app) screen for the URL from IndexedDB.
				navigateFallback: null,
				runtimeCaching: [
					{
						// The technician's screens (their HTML holds no data): wait 4 s at most.
						urlPattern: ({ request, url }) =>
							request.mode === 'navigate' && /^\/(field|home|job|sync|meters)(\/|$)/.test(url.pathname),
						handler: 'NetworkFirst',
						options: {
							cacheName: 'app-screens',
							networkTimeoutSeconds: 4,
							precacheFallback: { fallbackURL: '/shell' }
						}
					},
					{
						// Server-rendered pages (lead, office, library) are never cached.
						urlPattern: ({ request }) => request.mode === 'navigate',
						handler: 'NetworkOnly',
						options: { precacheFallback: { fallbackURL: '/shell' } }
					}
				],
				clientsClaim: true,
				skipWaiting: false
			}
		})
	],
	server: { host: '127.0.0.1' },
	test: {
		projects: [
			{
				extends: true,
				test: {
					name: 'unit',
					environment: 'node',
					include: ['tests/unit/**/*.test.ts']
				}
			},
			{
				extends: true,
				test: {
					name: 'integration',
					environment: 'node',
					include: ['tests/integration/**/*.test.ts'],
					globalSetup: ['tests/integration/global-setup.ts'],
					setupFiles: ['tests/integration/setup-env.ts'],
					fileParallelism: false,
					testTimeout: 30_000,
					hookTimeout: 60_000
				}
			},
			{
				extends: true,
				test: {
					name: 'e2e',
					environment: 'node',
					include: ['tests/e2e/**/*.e2e.ts'],
					globalSetup: ['tests/e2e/global-setup.ts'],
					fileParallelism: false,
					testTimeout: 90_000,
					hookTimeout: 120_000
				}
			}
		]
	}
});
