"""The one data layer: open a registry, read with retries, write in one transaction."""
