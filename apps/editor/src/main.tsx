import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import '@xyflow/react/dist/base.css';
import './theme/theme.css';
import { App } from './App.tsx';
import { bootDocument } from './files/autosave.ts';
import { installTestHook } from './store/test-hook.ts';

bootDocument();
installTestHook();
createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <App />
  </StrictMode>,
);
