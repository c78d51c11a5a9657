import type { RouteRecordRaw } from 'vue-router'
import { RouteNames } from '../names'

/** Signed-out pages: sign-in, forgotten password, reset or invitation links. */
export const authRoutes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: RouteNames.signIn,
    component: () => import('@/views/SignInView.vue'),
    meta: { title: 'Sign in', public: true, guestOnly: true },
  },
  {
    path: '/forgot-password',
    name: RouteNames.forgotPassword,
    component: () => import('@/views/ForgotPasswordView.vue'),
    meta: { title: 'Forgotten password', public: true, guestOnly: true },
  },
  {
    // Both the "forgot password" mail and the invitation mail link here (?token=...[&invite=1]).
    path: '/reset-password',
    name: RouteNames.resetPassword,
    component: () => import('@/views/ResetPasswordView.vue'),
    meta: { title: 'Set a password', public: true },
  },
]
