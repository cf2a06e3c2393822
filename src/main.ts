import { createApp } from 'vue';
import { createPinia } from 'pinia';
import '@fontsource/work-sans/400.css';
import '@fontsource/work-sans/500.css';
import '@fontsource/work-sans/600.css';
import './styles/tokens.css';
import './styles/base.css';
import App from './App.vue';
import { router } from './router';
import { setUnauthorizedHandler } from './api/client';
import { useSessionStore } from './stores/session';
import { cssVariables } from './styles/palette';
import { registerServiceWorker } from './service-worker/register';

for (const [name, value] of Object.entries(cssVariables())) document.documentElement.style.setProperty(name, value);

const app = createApp(App);
const pinia = createPinia();
app.use(pinia);
app.use(router);

// A 401 from any call means the session has ended: forget it and ask to sign in again.
setUnauthorizedHandler(() => {
  useSessionStore(pinia).reset();
  const current = router.currentRoute.value;
  if (current.path !== '/sign-in') void router.replace({ path: '/sign-in', query: { next: current.fullPath } });
});

app.mount('#app');
registerServiceWorker();
