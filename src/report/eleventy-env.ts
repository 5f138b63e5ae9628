/**
 * Imported by eleventy.ts before Eleventy itself (ES modules evaluate in import order).
 *
 * On import, Eleventy 3 registers an ES-module resolve hook that busts its import cache for
 * watch mode (`src/Util/EsmResolverPortAdapter.js`). On Node 20 that hook runs in its own
 * loader thread, and every later import then waits on a round trip to it: in a 381 MiB build's
 * CPU profile, about 0.1 s on this thread plus the thread's own start-up. Lacuna renders once
 * and never watches, so it sets Eleventy's own switch for skipping the hook (11ty/eleventy
 * issue 3371), unless the environment already set it.
 */
process.env.ELEVENTY_SKIP_ESM_RESOLVER ??= '1';
export {};
