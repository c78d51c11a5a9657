import type { ThemeConfig } from 'ant-design-vue/es/config-provider/context'

/**
 * Skyfurrow's colours. The primary is a deep field green; neutrals lean warm like dry soil.
 * Forecast states use a colour-blind-safe trio (never red/green), always with a label:
 * Clear = dark blue, Tight = light sand, Closed = dark brown-red.
 */
export const palette = {
  primary: '#2b5d4a',
  primaryDark: '#1c3b30',
  ink: '#1f2823',
  inkMuted: '#55625b',
  paper: '#f6f5f0',
  line: '#dedcd2',
  sand: '#e7d7a9',
  stateClear: '#1f3a6e',
  stateTight: '#e9d9ac',
  stateClosed: '#74281f',
} as const

export const fontStack =
  "'Open Sans', system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif"

export const theme: ThemeConfig = {
  token: {
    colorPrimary: palette.primary,
    colorInfo: palette.stateClear,
    colorLink: palette.primary,
    colorTextBase: palette.ink,
    colorBgLayout: palette.paper,
    colorBorderSecondary: palette.line,
    fontFamily: fontStack,
    fontSize: 15,
    borderRadius: 6,
  },
}
