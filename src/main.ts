import { createApp } from 'vue';
import { createPinia } from 'pinia';
import PrimeVue from 'primevue/config';
import ToastService from 'primevue/toastservice';
import ConfirmationService from 'primevue/confirmationservice';
import Tooltip from 'primevue/tooltip';

// The typeface ships with the app (bundled by Vite): no font is fetched from another origin. Only its Latin
// subset is bundled (the screens' text is English; other glyphs fall back to the system's sans-serif), and
// index.html preloads the weights the first screen draws (vite.config.ts).
import '@fontsource/source-sans-3/latin-400.css';
import '@fontsource/source-sans-3/latin-600.css';
import '@fontsource/source-sans-3/latin-700.css';
import 'primeicons/primeicons.css';
import './assets/main.css';

import App from './App.vue';
import router from './router';
import { installErrorToasts } from './api/error-toast';
import { ArcwrightPreset } from './theme/preset';

const app = createApp(App);

app.use(createPinia());
app.use(PrimeVue, {
  theme: {
    preset: ArcwrightPreset,
    // Light scheme only: no selector switches to dark.
    options: { darkModeSelector: false, cssLayer: false },
  },
});
app.use(ToastService);
app.use(ConfirmationService);
app.directive('tooltip', Tooltip);
installErrorToasts(app);
app.use(router);

app.mount('#app');
