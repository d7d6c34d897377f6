/**
 * How the e2e tests and the browser benchmark start Chromium: Debian's /usr/bin/chromium
 * (never a downloaded browser) with software WebGL (SwiftShader through ANGLE).
 */
export const CHROMIUM_PATH = process.env.DECENTRA_CHROMIUM ?? '/usr/bin/chromium';

export const CHROMIUM_ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
  '--use-angle=swiftshader', '--enable-unsafe-swiftshader',
];

export const VIEWPORT = { width: 1280, height: 800 };
