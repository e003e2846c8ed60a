import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import '@xyflow/react/dist/base.css';
import './theme/theme.css';
import { App } from './App.tsx';
import { bootDocument } from './files/autosave.ts';
import { installTestHook } from './store/test-hook.ts';
import { useUiStore } from './store/ui-store.ts';

bootDocument();
document.documentElement.dataset.theme = useUiStore.getState().theme;
installTestHook();
createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <App />
  </StrictMode>,
);
