import type { Config } from 'tailwindcss';

/**
 * Tacet's palette and type: a warm paper page, ink text, one blue-violet accent for actions and
 * selection, a muted sage for continuum/reference curves, red only for errors.
 * Loaded by src/styles.css through Tailwind's `@config` directive.
 */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#f7f4ee', deep: '#efeae0' },
        ink: { DEFAULT: '#1d1b22', soft: '#4a4753', faint: '#8a8693' },
        rule: '#d9d3c7',
        accent: { DEFAULT: '#4b3fb0', soft: '#e4e0f6', deep: '#362b8c' },
        reference: { DEFAULT: '#7d9a86', soft: '#e3ebe4' },
        danger: { DEFAULT: '#b3261e', soft: '#f7e1df' },
      },
      fontFamily: {
        mono: ['"JetBrains Mono"', 'ui-monospace', 'monospace'],
        sans: ['system-ui', '-apple-system', '"Segoe UI"', 'Roboto', 'sans-serif'],
      },
    },
  },
} satisfies Config;
