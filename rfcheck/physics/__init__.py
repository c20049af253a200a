"""Pure-numpy SI physics: no specs, no rules, no units library."""
