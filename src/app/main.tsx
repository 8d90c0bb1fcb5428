import { render } from 'preact';
import { App } from './App';
import { applyTheme, loadTheme } from './models/theme';
import { startServices } from './services';
import { startServiceWorker } from './sw-bridge';
import { installBeforeUnloadGuard } from './unsaved-input';
import './styles.css';

applyTheme(loadTheme());
startServices();
installBeforeUnloadGuard();
const root = document.getElementById('root');
if (!root) throw new Error('index.html has no #root element');
root.textContent = '';
render(<App />, root);
startServiceWorker();
