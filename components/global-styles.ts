// Native: nothing to install; focus is drawn by the platform.
export function installGlobalStyles(): void {}
