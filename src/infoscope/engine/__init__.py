"""infoscope.engine"""
