/**
 * Debian's Chromium through playwright-core (never a downloaded browser),
 * with the flags this machine needs: without the background-networking ones
 * Chromium keeps trying hosts the closed network refuses.
 */
import { chromium, type BrowserContext } from 'playwright-core';

export function launchChromium(profileDir: string): Promise<BrowserContext> {
  return chromium.launchPersistentContext(profileDir, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}
