import { createApp } from 'vue';
import { createPinia } from 'pinia';
import PrimeVue from 'primevue/config';
import ConfirmationService from 'primevue/confirmationservice';
import ToastService from 'primevue/toastservice';
import Tooltip from 'primevue/tooltip';

import '@fontsource/lato/400.css';
import '@fontsource/lato/400-italic.css';
import '@fontsource/lato/700.css';
import '@fontsource/lato/900.css';
import 'primeicons/primeicons.css';
import './styles/base.css';

import App from './App.vue';
import { createAppRouter } from './router';
import { setUnauthorizedHandler } from './api/client';
import { useSessionStore } from './stores/session.store';
import { DriftlinePreset } from './theme/driftline.preset';

const app = createApp(App);
const pinia = createPinia();
app.use(pinia);

const router = createAppRouter();

// A 401 from any signed-in call means the server ended the session: forget the user and ask them to sign in again, then come back.
setUnauthorizedHandler(() => {
  useSessionStore(pinia).clearLocal();
  const current = router.currentRoute.value;
  if (current.meta.public) return;
  void router.replace({ name: 'sign-in', query: { next: current.fullPath } });
});

app.use(router);
app.use(PrimeVue, {
  theme: {
    preset: DriftlinePreset,
    // The app has one light look; a dark scheme would need its own map colours.
    options: { darkModeSelector: 'none', cssLayer: { name: 'primevue', order: 'primevue' } },
  },
});
app.use(ConfirmationService);
app.use(ToastService);
app.directive('tooltip', Tooltip);

app.mount('#app');
