import type { Config } from 'tailwindcss';

// A calm palette. Status colours follow the Okabe–Ito set, which stays distinguishable
// under the common forms of colour blindness.
export default {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: '#1f2a30', soft: '#4a5a63', faint: '#7b8a92' },
        paper: { DEFAULT: '#f6f4ef', raised: '#ffffff', sunk: '#ebe7de' },
        brand: { DEFAULT: '#1d5c63', dark: '#143f44', light: '#d6e8e6' },
        status: {
          ok: '#009e73',
          warn: '#e69f00',
          bad: '#d55e00',
          info: '#0072b2',
          muted: '#999999',
        },
      },
      fontFamily: {
        sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
      },
    },
  },
} satisfies Config;
