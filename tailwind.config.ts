import type { Config } from 'tailwindcss'

// Our palette: deep pond teal for structure, koi orange for actions, reed green and clay red for states.
export default {
  content: ['./app/**/*.{vue,ts}'],
  theme: {
    extend: {
      fontFamily: { sans: ['"Nunito Sans"', 'system-ui', 'sans-serif'] },
      colors: {
        pond: { 50: '#eef7f6', 100: '#d3ebe8', 200: '#a6d6d0', 300: '#6fb9b1', 400: '#3f978f', 500: '#257a73', 600: '#1b615c', 700: '#164e4a', 800: '#123f3c', 900: '#0d3b3e', 950: '#072224' },
        koi: { 50: '#fff4ec', 100: '#ffe3cf', 200: '#ffc39c', 300: '#ff9b5e', 400: '#f9752d', 500: '#e85a12', 600: '#c4450b', 700: '#9c360d', 800: '#7e2e11', 900: '#672811' },
        reed: { 100: '#e6f2dc', 500: '#4f8a2b', 700: '#33601a' },
        clay: { 100: '#fbe4e1', 500: '#c23a2b', 700: '#8f2419' },
        sand: { 50: '#fbf9f4', 100: '#f4efe3', 200: '#e7dfcb' },
      },
      borderRadius: { card: '1.1rem' },
    },
  },
} satisfies Config
