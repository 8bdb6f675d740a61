import '@fontsource/inter/latin-400.css'
import '@fontsource/inter/latin-500.css'
import '@fontsource/inter/latin-600.css'
import { createPinia } from 'pinia'
import { createApp } from 'vue'
import App from './App.vue'
import { setHttpHandlers } from './api/http'
import { notify } from './lib/discrete'
import { createAppRouter } from './router'
import { useSessionStore } from './stores/session'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
const router = createAppRouter()
app.use(router)

const session = useSessionStore(pinia)
setHttpHandlers({
  unauthenticated: (error) => {
    const wasSignedIn = session.signedIn
    session.clear()
    const here = router.currentRoute.value
    if (here.meta.public) return
    if (wasSignedIn) notify.info(error.message)
    void router.push({ name: 'signIn', query: { next: here.fullPath } })
  },
  forbidden: () => notify.warning('You are not allowed to do that with your role.'),
  unreachable: (error) => notify.error(error.message),
})

app.mount('#app')
