/** A tiny HTTP client with a cookie jar, for integration tests against the built app. */
export class Client {
	cookies = new Map<string, string>();
	constructor(
		readonly base: string,
		readonly address = '127.0.0.1'
	) {}

	private keep(r: Response) {
		for (const c of r.headers.getSetCookie()) {
			const [pair] = c.split(';');
			const i = pair.indexOf('=');
			const name = pair.slice(0, i);
			const value = pair.slice(i + 1);
			if (value === '' || /max-age=0/i.test(c)) this.cookies.delete(name);
			else this.cookies.set(name, value);
		}
		return r;
	}

	headers(extra: Record<string, string> = {}) {
		const cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
		return {
			origin: this.base,
			'x-forwarded-for': this.address,
			...(cookie ? { cookie } : {}),
			...extra
		};
	}

	async get(path: string, accept = 'application/json') {
		return this.keep(
			await fetch(this.base + path, { headers: this.headers({ accept }), redirect: 'manual' })
		);
	}

	async json(method: string, path: string, body: unknown) {
		return this.keep(
			await fetch(this.base + path, {
				method,
				headers: this.headers({ 'content-type': 'application/json', accept: 'application/json' }),
				body: typeof body === 'string' ? body : JSON.stringify(body),
				redirect: 'manual'
			})
		);
	}

	async form(path: string, fields: Record<string, string>) {
		return this.keep(
			await fetch(this.base + path, {
				method: 'POST',
				headers: this.headers({
					'content-type': 'application/x-www-form-urlencoded',
					accept: 'text/html'
				}),
				body: new URLSearchParams(fields).toString(),
				redirect: 'manual'
			})
		);
	}

	signIn(email: string, password: string) {
		return this.form('/sign-in', { email, password });
	}
}
