"""rfcheck: design-review checks for RF- and microwave-heated plasma sources."""

__version__ = "0.1.0"
