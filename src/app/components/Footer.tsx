export function Footer() {
  return (
    <footer class="footer">
      <p>
        Crankhouse <span data-testid="app-version">{__APP_VERSION__}</span>
      </p>
      <p class="footer__safety">
        This app supports, and never replaces, the site's isolation procedure, permits and local codes.
      </p>
    </footer>
  );
}
