"""Report templates and stylesheet, shipped inside the wheel as rfcheck.templates."""
