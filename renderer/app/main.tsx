import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { initTransport } from '../api/client.ts';
import { App } from './App.tsx';
import './styles.css';

initTransport();
const root = document.getElementById('root');
if (root) {
  createRoot(root).render(
    <StrictMode>
      <App />
    </StrictMode>,
  );
}
