"""inspector.frame"""
