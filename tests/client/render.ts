import { createSSRApp, h, type Component } from 'vue';
import { renderToString } from 'vue/server-renderer';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createPinia, setActivePinia } from 'pinia';
import { setup as setupStyles } from '@css-render/vue3-ssr';
import { NConfigProvider, NDialogProvider, NMessageProvider, NNotificationProvider } from 'naive-ui';

const Blank = { render: () => null };

/**
 * A component rendered to HTML the way the server renderer does it (no browser): inside the app's
 * providers, a router at `path` and a fresh Pinia. Lifecycle hooks such as onMounted do not run.
 */
export async function renderHtml(
  component: Component,
  props: Record<string, unknown> = {},
  options: { path?: string; before?: () => void } = {},
): Promise<string> {
  const app = createSSRApp({
    render: () =>
      h(NConfigProvider, null, () =>
        h(NMessageProvider, null, () =>
          h(NNotificationProvider, null, () => h(NDialogProvider, null, () => h(component, props))),
        ),
      ),
  });
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/jobs/:id(\\d+)/:page?', component: Blank },
      { path: '/:rest(.*)*', component: Blank },
    ],
  });
  const pinia = createPinia();
  app.use(router).use(pinia);
  setActivePinia(pinia);
  options.before?.();
  await router.push(options.path ?? '/');
  await router.isReady();
  // naive-ui writes its styles through css-render; on the server it needs this adapter.
  setupStyles(app);
  // What drawers and dialogs teleport to the body comes after the page, as a browser would show it.
  const ctx: { teleports?: Record<string, string> } = {};
  const html = (await renderToString(app, ctx)) + Object.values(ctx.teleports ?? {}).join('');
  // Scoped-style markers say nothing about the page: dropped, so tests read the markup itself.
  return html.replace(/ data-v-[0-9a-f]+(="")?/g, '');
}

export interface Control {
  tag: string;
  attrs: Record<string, string>;
}

/** Every form control in the HTML (input, textarea, select) with its attributes. */
export function controlsOf(html: string): Control[] {
  return [...html.matchAll(/<(input|textarea|select)\b([^>]*)>/g)].map((m) => ({
    tag: m[1]!,
    attrs: Object.fromEntries([...m[2]!.matchAll(/([\w:-]+)(?:="([^"]*)")?/g)].map((a) => [a[1]!, a[2] ?? ''])),
  }));
}

/** The ids that some <label for="…"> names. */
export function labelledIds(html: string): Set<string> {
  return new Set([...html.matchAll(/<label\b[^>]*\bfor="([^"]+)"/g)].map((m) => m[1]!));
}

/** Controls a screen reader would announce with no name: no label for their id, no aria-label(ledby). */
export function unlabelled(html: string): Control[] {
  const ids = labelledIds(html);
  return controlsOf(html).filter(
    (c) =>
      c.attrs.type !== 'hidden' &&
      !c.attrs['aria-label'] &&
      !c.attrs['aria-labelledby'] &&
      !(c.attrs.id && ids.has(c.attrs.id)),
  );
}
