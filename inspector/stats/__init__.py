"""inspector.stats"""
