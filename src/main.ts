import { createApp } from 'vue';
import { createPinia } from 'pinia';
import 'element-plus/dist/index.css';
import './styles/index.css';
import App from './App.vue';
import { setUnauthorizedHandler } from './api/http';
import { createAppRouter } from './router';
import { useAuthStore } from './stores/auth';

const app = createApp(App);
const pinia = createPinia();
app.use(pinia);
const router = createAppRouter();
app.use(router);

// The session ended under us (expired, or signed out in another tab): back to sign-in.
setUnauthorizedHandler(() => {
  useAuthStore(pinia).forget();
  const here = router.currentRoute.value;
  if (!here.meta.public) void router.push({ name: 'sign-in', query: { redirect: here.fullPath } });
});

app.mount('#app');
