import 'vue-router';
import type { Role } from '@/api/types';

declare module 'vue-router' {
  interface RouteMeta {
    /** Open without signing in (sign-in, invitation links). */
    public?: boolean;
    /** Roles that may open the route; absent means every signed-in user. The server checks again. */
    roles?: Role[];
    /** Page title shown in the browser tab. */
    title?: string;
    /** 'bare' renders without the app's top bar (sign-in, invitations). */
    layout?: 'app' | 'bare';
  }
}
