import type { Config } from 'tailwindcss'

// Our own palette for a dim grading room: low-luminance slate surfaces, one teal accent,
// and status colours chosen to stay distinguishable for the common colour-vision deficiencies.
export default {
  content: ['./app/**/*.{vue,ts}'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['Inter', 'system-ui', 'sans-serif'],
        mono: ['"Roboto Mono"', 'ui-monospace', 'monospace'],
      },
      colors: {
        ink: { 950: '#0b0d10', 900: '#111418', 850: '#161a1f', 800: '#1c2127', 700: '#272e36', 600: '#36404a', 500: '#4d5965', 400: '#75818d', 300: '#a3adb7', 200: '#c9d0d7', 100: '#e6eaee' },
        accent: { 600: '#1f8f87', 500: '#2bb0a6', 400: '#4cc9bf', 300: '#86ddd5' },
        verdict: { pass: '#4cae6b', caution: '#e0a43a', fail: '#e0564a' },
      },
    },
  },
} satisfies Config
