/// <reference types="vite-plugin-pwa/client" />
// See https://svelte.dev/docs/kit/types#app.d.ts
import type { SessionUser } from '$lib/server/auth/types';

declare global {
	namespace App {
		interface Error {
			code?: string;
		}
		interface Locals {
			user: SessionUser | null;
			sessionId: string | null;
		}
	}
}

export {};
