/**
 * How the three hour states look: our own colour-blind-safe trio (dark blue, light sand,
 * dark brown-red, never red/green), each always paired with a word and a mark so that the
 * state can be read without seeing colour.
 */
import type { HourState } from '@shared/schemas/planning'

export interface StateLook {
  label: string
  /** a one-character mark drawn in every cell */
  mark: string
  background: string
  text: string
  /** what the state means, for legends and tooltips */
  meaning: string
}

export const stateLooks: Record<HourState, StateLook> = {
  clear: {
    label: 'Clear',
    mark: '✓',
    background: '#1f3a6e',
    text: '#ffffff',
    meaning: 'meets the work type on the required share of the field, with one satellite lost',
  },
  tight: {
    label: 'Tight',
    mark: '~',
    background: '#e9d9ac',
    text: '#3d3418',
    meaning: 'meets it, but without the one-satellite margin or on less of the field',
  },
  closed: {
    label: 'Closed',
    mark: '✕',
    background: '#74281f',
    text: '#ffffff',
    meaning: 'does not meet the work type',
  },
}

export const stateOrder: readonly HourState[] = ['clear', 'tight', 'closed']
