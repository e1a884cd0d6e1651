// The app shell: prerendered, rendered in the browser. The service worker serves it for
// every navigation when there is no signal; the router then shows the screen for the URL.
export const prerender = true;
export const ssr = false;
